/**
 * Pump runs from a pump's switch samples, with current, flow and tank level for what each run
 * drew and delivered.
 *
 * TODO(core): core/src/pumps/ has no pump-run functions yet; move this there (and use them here)
 * once it does. It is pure (no I/O) so it can move as it is.
 */

/** A sample: seconds since the epoch and a value. */
export interface TimedValue {
  t: number;
  v: number;
}

export interface PumpRunInputs {
  /** `pump/<key>/running` as 1/0, sorted by time. Empty when the pump has no switch channel. */
  running: readonly TimedValue[];
  /** `pump/<key>/current`, amperes, sorted by time. */
  current: readonly TimedValue[];
  /** `pump/<key>/flow`, m³/s, sorted by time (optional meter). */
  flow: readonly TimedValue[];
  /** Battery voltage, volts, sorted by time (for energy when the pump runs from the bank). */
  batteryVoltage: readonly TimedValue[];
  /** Water in the tank the pump fills, m³, sorted by time (from `tank/<key>/level` via core). */
  tankVolume: readonly TimedValue[];
  /** Rated current, amperes: without a switch channel, a pump draws more than 10 % of it while on. */
  ratedCurrentA: number;
  /** Samples further apart than this leave the state unknown in between, seconds. */
  maxGapSeconds: number;
}

export interface DerivedPumpRun {
  startedAt: number;
  /** Null while the pump is still running at the last sample. */
  endedAt: number | null;
  durationS: number | null;
  meanCurrentA: number | null;
  energyWh: number | null;
  waterM3: number | null;
  waterSource: 'flow' | 'tank_rise' | null;
  /** The samples inside the run have a gap longer than the maximum: figures are partial. */
  spansGap: boolean;
}

/** Fraction of the rated current above which a pump without a switch channel counts as on. */
export const RUNNING_CURRENT_FRACTION = 0.1;

/** On/off samples: the switch channel when there is one, otherwise current against rating. */
export function switchSamples(inputs: PumpRunInputs): TimedValue[] {
  if (inputs.running.length > 0) return [...inputs.running];
  const threshold = inputs.ratedCurrentA * RUNNING_CURRENT_FRACTION;
  return inputs.current.map((s) => ({ t: s.t, v: s.v > threshold ? 1 : 0 }));
}

/** Samples in [from, to): the sample that ends a run already shows the pump off. */
function within(samples: readonly TimedValue[], from: number, to: number): TimedValue[] {
  return samples.filter((s) => s.t >= from && s.t < to);
}

function mean(samples: readonly TimedValue[]): number | null {
  if (samples.length === 0) return null;
  return samples.reduce((a, s) => a + s.v, 0) / samples.length;
}

/** The latest sample at or before t (within the gap), or null. */
function atOrBefore(samples: readonly TimedValue[], t: number, maxGap: number): TimedValue | null {
  let found: TimedValue | null = null;
  for (const s of samples) {
    if (s.t > t) break;
    found = s;
  }
  return found && t - found.t <= maxGap ? found : null;
}

/**
 * Splits switch samples into runs. A run starts at the first "on" sample after an "off" one (or
 * at the first sample when it is on) and ends at the next "off" sample; a run still on at the
 * last sample stays open. Water comes from the flow meter when it has samples in the run,
 * otherwise from the rise of the filled tank between the start and the end (which misses water
 * drawn off while the pump ran, so it is a lower bound).
 */
export function derivePumpRuns(inputs: PumpRunInputs): DerivedPumpRun[] {
  const samples = switchSamples(inputs);
  const runs: DerivedPumpRun[] = [];
  let start: number | null = null;
  let spansGap = false;
  let previous: TimedValue | null = null;
  for (const s of samples) {
    if (start !== null && previous && s.t - previous.t > inputs.maxGapSeconds) spansGap = true;
    if (s.v >= 0.5 && start === null) {
      start = s.t;
      spansGap = false;
    } else if (s.v < 0.5 && start !== null) {
      runs.push(finishRun(inputs, start, s.t, spansGap));
      start = null;
    }
    previous = s;
  }
  if (start !== null) runs.push(finishRun(inputs, start, null, spansGap));
  return runs;
}

function finishRun(
  inputs: PumpRunInputs,
  startedAt: number,
  endedAt: number | null,
  spansGap: boolean,
): DerivedPumpRun {
  const lastT = endedAt ?? Number.POSITIVE_INFINITY;
  const current = within(inputs.current, startedAt, lastT);
  const meanCurrentA = mean(current);
  const durationS = endedAt === null ? null : endedAt - startedAt;
  const meanVolts = mean(within(inputs.batteryVoltage, startedAt, lastT));
  const energyWh =
    durationS !== null && meanCurrentA !== null && meanVolts !== null
      ? Math.max(0, (meanCurrentA * meanVolts * durationS) / 3600)
      : null;

  let waterM3: number | null = null;
  let waterSource: DerivedPumpRun['waterSource'] = null;
  const flow = within(inputs.flow, startedAt, lastT);
  if (durationS !== null && flow.length > 0) {
    waterM3 = Math.max(0, (mean(flow) ?? 0) * durationS);
    waterSource = 'flow';
  } else if (endedAt !== null && inputs.tankVolume.length > 0) {
    const before = atOrBefore(inputs.tankVolume, startedAt, inputs.maxGapSeconds);
    const after = atOrBefore(inputs.tankVolume, endedAt, inputs.maxGapSeconds);
    if (before && after && after.t > before.t) {
      waterM3 = Math.max(0, after.v - before.v);
      waterSource = 'tank_rise';
    }
  }
  return { startedAt, endedAt, durationS, meanCurrentA, energyWh, waterM3, waterSource, spansGap };
}
