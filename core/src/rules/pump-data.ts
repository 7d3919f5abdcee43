/**
 * Pump runs for the rules: the stored runs when the caller has them, otherwise found from the
 * pump's switch-state and current samples.
 */
import type { PumpRun } from '../pumps/pump-runs.js';
import type { Sample } from '../series.js';
import { detectPumpRuns } from '../pumps/pump-runs.js';
import { measurementName } from '../telemetry/measurements.js';
import type { RuleInput, RulePumpConfig } from './types.js';
import { booleanSeries, numericSeries } from './support.js';

/** Runs of one pump from the input. */
export function pumpRunsFor(input: RuleInput, pump: RulePumpConfig): PumpRun[] {
  if (input.pumpRuns) return input.pumpRuns.filter((r) => r.pumpKey === pump.key);
  return detectPumpRuns(pump, {
    running: booleanSeries(input, measurementName('pump/<pump>/running', pump.key)),
    current: numericSeries(input, measurementName('pump/<pump>/current', pump.key)),
  });
}

/**
 * Whether the pump was running at every sample in [fromT, toT] and the samples cover the window
 * (first at or before fromT + 10 % of it). Uses the running state, or current over a tenth of rated.
 */
export function runningThroughout(
  input: RuleInput,
  pump: RulePumpConfig,
  fromT: number,
  toT: number,
): boolean {
  const series = pumpStates(input, pump);
  const before = [...series].reverse().find((s) => s.t <= fromT);
  const inside = series.filter((s) => s.t > fromT && s.t <= toT);
  if (!before || !before.v) return false;
  return inside.every((s) => s.v);
}

/** On/off samples of a pump: its running state, or current over a tenth of rated. */
export function pumpStates(input: RuleInput, pump: RulePumpConfig): Sample<boolean>[] {
  const states = booleanSeries(input, measurementName('pump/<pump>/running', pump.key));
  if (states.length > 0) return states;
  return numericSeries(input, measurementName('pump/<pump>/current', pump.key)).map((s) => ({
    t: s.t,
    v: s.v > 0.1 * pump.ratedCurrentAmps,
  }));
}
