/**
 * dry_run — "Running dry": the pump is on but draws well under its rated current, or it runs
 * without the tank it fills rising (allowing for draw meanwhile). For PV-direct pumps low
 * current is normal under cloud, so the current test applies only while their array is giving a
 * good share of its rating; the tank-rise test applies to every pump.
 */
import { measurementName } from '../telemetry/measurements.js';
import { waterDeliveredByRun } from '../pumps/water-delivered.js';
import { tankVolumeFromLevel } from '../tanks/tank-volume.js';
import type { Sample } from '../series.js';
import type { RuleDecision, RuleInput, RulePumpConfig } from './types.js';
import type { RuleParamsOverrides } from './defaults.js';
import { ruleParamsFor } from './defaults.js';
import { decide, minutes, numericSeries, percent } from './support.js';
import { pumpRunsFor, runningThroughout } from './pump-data.js';

/** Evaluates dry_run for every pump (subject: the pump key). */
export function evaluateDryRun(input: RuleInput, overrides?: RuleParamsOverrides): RuleDecision[] {
  return input.site.pumps.map((pump) => evaluatePump(input, pump, overrides));
}

function pvShareOfRating(input: RuleInput, pump: RulePumpConfig, fromT: number): number | null {
  const array = input.site.pvArrays.find((a) => a.key === pump.pvArrayKey);
  if (!array || !(array.ratedWatts > 0)) return null;
  const volts = numericSeries(input, measurementName('pv/<array>/voltage', array.key)).filter(
    (s) => s.t >= fromT,
  );
  const amps = numericSeries(input, measurementName('pv/<array>/current', array.key)).filter(
    (s) => s.t >= fromT,
  );
  if (volts.length === 0 || amps.length === 0) return null;
  const meanV = volts.reduce((sum, s) => sum + s.v, 0) / volts.length;
  const meanA = amps.reduce((sum, s) => sum + s.v, 0) / amps.length;
  return (meanV * meanA) / array.ratedWatts;
}

/** The level at which the tank counts as full: the float_stuck rule's, so the two agree. */
function fullFractionForNoRise(input: RuleInput, overrides?: RuleParamsOverrides): number {
  return ruleParamsFor('float_stuck', input.site, overrides).fullFraction;
}

function evaluatePump(
  input: RuleInput,
  pump: RulePumpConfig,
  overrides?: RuleParamsOverrides,
): RuleDecision {
  const p = ruleParamsFor('dry_run', input.site, overrides, pump.key);
  const rated = pump.ratedCurrentAmps;
  if (!(rated > 0))
    return decide(input, 'dry_run', pump.key, { insufficient: 'rated current not set' });
  const fromT = input.nowT - p.holdSeconds;
  const currents = numericSeries(input, measurementName('pump/<pump>/current', pump.key));
  const windowCurrents = currents.filter((s) => s.t >= fromT && s.t <= input.nowT);
  const running = runningThroughout(input, pump, fromT, input.nowT);

  // Test 1: low current while running.
  let lowCurrent = false;
  let currentCheckSkipped: string | null = null;
  const meanCurrent =
    windowCurrents.length > 0
      ? windowCurrents.reduce((sum, s) => sum + s.v, 0) / windowCurrents.length
      : null;
  if (running && windowCurrents.length >= 2) {
    let applies = true;
    if (pump.supply === 'pv_direct') {
      const share = pvShareOfRating(input, pump, fromT);
      applies = share !== null && share >= p.minPvShareForCurrentCheck;
      if (!applies) currentCheckSkipped = 'PV-direct pump with weak sun: low current is expected';
    }
    lowCurrent = applies && windowCurrents.every((s) => s.v < p.lowCurrentFraction * rated);
  }

  // Test 2: a long run that did not raise the tank.
  const runs = pumpRunsFor(input, pump);
  const tank = pump.fillsTankKey
    ? (input.site.tanks.find((t) => t.key === pump.fillsTankKey) ?? null)
    : null;
  const levels: Sample[] = tank
    ? numericSeries(input, measurementName('tank/<tank>/level', tank.key))
    : [];
  const flows = numericSeries(input, measurementName('pump/<pump>/flow', pump.key));
  const lastLongRun = [...runs]
    .reverse()
    .find(
      (r) =>
        !r.spansGap &&
        r.durationSeconds >= p.noRiseMinRunSeconds &&
        r.endT >= input.nowT - 2 * 3600,
    );
  let noRise = false;
  let delivered: number | null = null;
  let expectedMinimum: number | null = null;
  // A tank that was already full cannot rise: water pumped into it overflows. That is the float
  // switch's fault (float_stuck), not a dry well, so the tank-rise test does not judge such a run.
  const fullDuringRun =
    tank !== null &&
    lastLongRun !== undefined &&
    levels.some((s) => {
      if (s.t < lastLongRun.startT || s.t > lastLongRun.endT) return false;
      const r = tankVolumeFromLevel(tank, s.v);
      return r.ok && r.fractionFull >= fullFractionForNoRise(input, overrides);
    });
  if (lastLongRun && (tank || flows.length > 0) && !fullDuringRun) {
    const d = waterDeliveredByRun(lastLongRun, { tank, levels, flows });
    delivered = d.cubicMetres;
    const ratedFlow = pump.ratedFlowCubicMetresPerSecond ?? null;
    expectedMinimum = ratedFlow
      ? p.minDeliveredShareOfRated * ratedFlow * lastLongRun.durationSeconds
      : tank
        ? 0.001
        : null;
    noRise = delivered !== null && expectedMinimum !== null && delivered < expectedMinimum;
  }

  // Recovery: the latest run long enough to judge drew proper current and moved water.
  const lastJudgedRun = [...runs].reverse().find((r) => r.durationSeconds >= p.holdSeconds);
  const currentRecovered =
    lastJudgedRun?.meanCurrentAmps !== null &&
    lastJudgedRun?.meanCurrentAmps !== undefined &&
    lastJudgedRun.meanCurrentAmps >= p.clearCurrentFraction * rated;
  const recovered =
    !lowCurrent && !noRise && (currentRecovered || (lastLongRun !== undefined && !noRise));

  const summary = lowCurrent
    ? `Pump ${pump.key} is running at ${percent((meanCurrent ?? 0) / rated)} of its rated current for over ${minutes(p.holdSeconds)}: it may be running dry`
    : `Pump ${pump.key} ran ${minutes(lastLongRun?.durationSeconds ?? 0)} but tank ${tank?.key ?? ''} did not rise: it may be running dry`;
  return decide(input, 'dry_run', pump.key, {
    triggered: lowCurrent || noRise,
    recovered,
    severity: 'act',
    faultSummary: summary,
    recoveredSummary:
      currentCheckSkipped ?? `Pump ${pump.key} draws normal current and moves water`,
    evidence: {
      fromT: lastLongRun && noRise ? lastLongRun.startT : fromT,
      toT: input.nowT,
      observed: [
        { label: 'Mean current while running', value: meanCurrent, unit: 'A' },
        {
          label: 'Share of rated current',
          value: meanCurrent === null ? null : meanCurrent / rated,
          unit: 'fraction',
        },
        { label: 'Running throughout', value: running, unit: null },
        { label: 'Water delivered by the last long run', value: delivered, unit: 'm3' },
      ],
      thresholds: [
        { label: 'Rated current', value: rated, unit: 'A' },
        { label: 'Low current below', value: p.lowCurrentFraction, unit: 'fraction' },
        { label: 'Held for', value: p.holdSeconds, unit: 's' },
        { label: 'Least water expected', value: expectedMinimum, unit: 'm3' },
      ],
    },
  });
}
