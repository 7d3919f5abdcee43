/**
 * All rule evaluators, by alert kind, and one call that runs them all.
 */
import type { MeasurementPattern } from '../telemetry/measurements.js';
import type { AlertKind, RuleDecision, RuleInput } from './types.js';
import type { RuleParamsOverrides } from './defaults.js';
import { evaluateLowCharge } from './low-charge.js';
import { evaluateOvernightSag } from './overnight-sag.js';
import { evaluateFloatStuck } from './float-stuck.js';
import { evaluateDryRun } from './dry-run.js';
import { evaluateShortCycling } from './short-cycling.js';
import { evaluateGatewaySilent } from './gateway-silent.js';
import { evaluateWaterLow } from './water-low.js';
import { evaluateNoCharge } from './no-charge.js';

/**
 * The measurements the evaluators read, and no others: a caller loading a site's samples for
 * the rules needs only these (a site's other sensors, such as well level or line pressure, are
 * for screens). The rules test checks the evaluators against this list.
 */
export const RULE_MEASUREMENTS: readonly MeasurementPattern[] = [
  'battery/voltage',
  'battery/current',
  'battery/temperature',
  'controller/stage',
  'pv/<array>/voltage',
  'pv/<array>/current',
  'pump/<pump>/running',
  'pump/<pump>/current',
  'pump/<pump>/flow',
  'tank/<tank>/level',
  'float/<switch>/closed',
];

/** A rule evaluator: pure, from input and the site's overrides to one decision per subject. */
export type RuleEvaluator = (input: RuleInput, overrides?: RuleParamsOverrides) => RuleDecision[];

/** The evaluator of each alert kind. */
export const RULE_EVALUATORS: Readonly<Record<AlertKind, RuleEvaluator>> = {
  low_charge: evaluateLowCharge,
  overnight_sag: evaluateOvernightSag,
  float_stuck: evaluateFloatStuck,
  dry_run: evaluateDryRun,
  short_cycling: evaluateShortCycling,
  gateway_silent: evaluateGatewaySilent,
  water_low: evaluateWaterLow,
  no_charge: evaluateNoCharge,
};

/**
 * Runs every evaluator (or the kinds given) and returns all decisions, including 'none' ones, so
 * a caller can record why nothing happened.
 */
export function evaluateRules(
  input: RuleInput,
  overrides?: RuleParamsOverrides,
  kinds: readonly AlertKind[] = Object.keys(RULE_EVALUATORS) as AlertKind[],
): RuleDecision[] {
  return kinds.flatMap((kind) => RULE_EVALUATORS[kind](input, overrides));
}

export {
  evaluateLowCharge,
  evaluateOvernightSag,
  evaluateFloatStuck,
  evaluateDryRun,
  evaluateShortCycling,
  evaluateGatewaySilent,
  evaluateWaterLow,
  evaluateNoCharge,
};
