/**
 * water_low — "Water low": days of water left, at the recent daily use, under the site's floor.
 */
import { measurementName } from '../telemetry/measurements.js';
import { tankVolumeFromLevel } from '../tanks/tank-volume.js';
import { daysOfWaterLeft, waterUseFromLevels } from '../tanks/water-use.js';
import { SECONDS_PER_DAY } from '../units.js';
import type { RuleDecision, RuleInput, RuleTankConfig } from './types.js';
import type { RuleParamsOverrides } from './defaults.js';
import { ruleParamsFor } from './defaults.js';
import { decide, fixed, numericSeries } from './support.js';

/** Evaluates water_low for every tank (subject: the tank key). */
export function evaluateWaterLow(
  input: RuleInput,
  overrides?: RuleParamsOverrides,
): RuleDecision[] {
  return input.site.tanks.map((tank) => evaluateTank(input, tank, overrides));
}

function evaluateTank(
  input: RuleInput,
  tank: RuleTankConfig,
  overrides?: RuleParamsOverrides,
): RuleDecision {
  const p = ruleParamsFor('water_low', input.site, overrides, tank.key);
  const levels = numericSeries(input, measurementName('tank/<tank>/level', tank.key)).filter(
    (s) => s.t >= input.nowT - p.useWindowDays * SECONDS_PER_DAY && s.t <= input.nowT,
  );
  const latest = levels[levels.length - 1];
  if (!latest || latest.t < input.nowT - 6 * 3600) {
    return decide(input, 'water_low', tank.key, { insufficient: 'no recent tank level' });
  }
  const now = tankVolumeFromLevel(tank, latest.v);
  if (!now.ok) return decide(input, 'water_low', tank.key, { insufficient: now.reason });
  const use = waterUseFromLevels(tank, levels);
  const spanDays =
    use.fromT !== null && use.toT !== null ? (use.toT - use.fromT) / SECONDS_PER_DAY : 0;
  if (spanDays < 1) {
    return decide(input, 'water_low', tank.key, {
      insufficient: 'less than a day of level history',
    });
  }
  const usePerDay = use.usedCubicMetres / spanDays;
  const reserve = tank.reserveCubicMetres ?? 0;
  const days = daysOfWaterLeft(now.cubicMetres, usePerDay, reserve);
  const effectiveDays = days ?? Number.POSITIVE_INFINITY;
  return decide(input, 'water_low', tank.key, {
    triggered: effectiveDays < p.floorDays,
    recovered: effectiveDays > p.clearAboveDays,
    severity: effectiveDays < p.actBelowDays ? 'act' : 'watch',
    faultSummary: `Tank ${tank.key} has about ${fixed(effectiveDays, 1)} days of water left at recent use`,
    recoveredSummary:
      days === null
        ? `Tank ${tank.key}: water is not going down`
        : `Tank ${tank.key} has about ${fixed(days, 1)} days of water left`,
    evidence: {
      fromT: use.fromT ?? input.nowT,
      toT: input.nowT,
      observed: [
        { label: 'Water in storage', value: now.cubicMetres, unit: 'm3', t: latest.t },
        { label: 'Tank full', value: now.fractionFull, unit: 'fraction', t: latest.t },
        { label: 'Use per day', value: usePerDay, unit: 'm3' },
        { label: 'Days of water left', value: days, unit: 'days' },
      ],
      thresholds: [
        { label: 'Floor', value: p.floorDays, unit: 'days' },
        { label: 'Act below', value: p.actBelowDays, unit: 'days' },
        { label: 'Clears above', value: p.clearAboveDays, unit: 'days' },
        { label: 'Reserve', value: reserve, unit: 'm3' },
      ],
    },
  });
}
