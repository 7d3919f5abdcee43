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

/** A running total of samples, summed in time order (so a continued total is the same number). */
export interface SampleSum {
  sum: number;
  n: number;
}

/**
 * What an open run's samples before `through` add up to, so a later derivation can continue the
 * run from `through` instead of reading it again from its start: a pump left on (stuck float,
 * a solar pump's whole day) otherwise means re-reading hours or days of samples on every sweep.
 * Valid only while nothing before `through` changes; the caller checks that.
 */
export interface OpenRunCarry {
  startedAt: number;
  /** Samples at or after this time are not in the totals, seconds. */
  through: number;
  /** The last switch sample before `through` (the run was on at every one since its start). */
  lastSwitchT: number;
  spansGap: boolean;
  current: SampleSum;
  volts: SampleSum;
  flow: SampleSum;
  /** The filled tank's volume at the start (for the water from its rise), if known. */
  tankBefore: TimedValue | null;
}

export interface ContinuedPumpRuns {
  runs: DerivedPumpRun[];
  /** The last run's carry up to `carryThrough`, when it is still open and began before it. */
  carry: OpenRunCarry | null;
}

/** Fraction of the rated current above which a pump without a switch channel counts as on. */
export const RUNNING_CURRENT_FRACTION = 0.1;

/** On/off samples: the switch channel when there is one, otherwise current against rating. */
export function switchSamples(inputs: PumpRunInputs): TimedValue[] {
  if (inputs.running.length > 0) return [...inputs.running];
  const threshold = inputs.ratedCurrentA * RUNNING_CURRENT_FRACTION;
  return inputs.current.map((s) => ({ t: s.t, v: s.v > threshold ? 1 : 0 }));
}

const NOTHING: SampleSum = { sum: 0, n: 0 };

/** `from` plus the samples in [start, end), added in time order. */
function sumWithin(
  samples: readonly TimedValue[],
  start: number,
  end: number,
  from: SampleSum = NOTHING,
): SampleSum {
  let { sum, n } = from;
  for (const s of samples) {
    if (s.t >= end) break;
    if (s.t < start) continue;
    sum += s.v;
    n += 1;
  }
  return { sum, n };
}

function meanOf(total: SampleSum): number | null {
  return total.n === 0 ? null : total.sum / total.n;
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
  return continuePumpRuns(inputs, null, null).runs;
}

/**
 * The same, continuing the open run `carry` describes: samples before `carry.through` are
 * ignored (the carry holds what they add up to), apart from tank volumes. The result is the
 * same as deriving from the run's start with every sample. With `carryThrough`, also returns
 * the carry of the last run up to that time when that run is still open.
 */
export function continuePumpRuns(
  inputs: PumpRunInputs,
  carry: OpenRunCarry | null,
  carryThrough: number | null,
): ContinuedPumpRuns {
  const cut = carry?.through ?? Number.NEGATIVE_INFINITY;
  const samples = switchSamples(inputs).filter((s) => s.t >= cut);
  const runs: DerivedPumpRun[] = [];
  let start: number | null = carry?.startedAt ?? null;
  let spansGap = carry?.spansGap ?? false;
  let previousT: number | null = carry?.lastSwitchT ?? null;
  /** Whether the run in progress is the carried one (its totals start from the carry's). */
  let carried = carry !== null;
  for (const s of samples) {
    if (start !== null && previousT !== null && s.t - previousT > inputs.maxGapSeconds) {
      spansGap = true;
    }
    if (s.v >= 0.5 && start === null) {
      start = s.t;
      spansGap = false;
    } else if (s.v < 0.5 && start !== null) {
      runs.push(finishRun(inputs, start, s.t, spansGap, carried ? carry : null));
      start = null;
      carried = false;
    }
    previousT = s.t;
  }
  if (start === null) return { runs, carry: null };
  const from = carried ? carry : null;
  runs.push(finishRun(inputs, start, null, spansGap, from));
  if (carryThrough === null || start >= carryThrough) return { runs, carry: null };
  return { runs, carry: carryOf(inputs, samples, start, carryThrough, from) };
}

/** The carry of the open run that began at `startedAt`, up to `through`. */
function carryOf(
  inputs: PumpRunInputs,
  samples: readonly TimedValue[],
  startedAt: number,
  through: number,
  from: OpenRunCarry | null,
): OpenRunCarry | null {
  if (from && through <= from.through) return from;
  const begin = from?.through ?? startedAt;
  let lastSwitchT = from?.lastSwitchT ?? null;
  let spansGap = from?.spansGap ?? false;
  for (const s of samples) {
    if (s.t < begin) continue;
    if (s.t >= through) break;
    if (lastSwitchT !== null && s.t - lastSwitchT > inputs.maxGapSeconds) spansGap = true;
    lastSwitchT = s.t;
  }
  if (lastSwitchT === null) return null;
  return {
    startedAt,
    through,
    lastSwitchT,
    spansGap,
    current: sumWithin(inputs.current, begin, through, from?.current),
    volts: sumWithin(inputs.batteryVoltage, begin, through, from?.volts),
    flow: sumWithin(inputs.flow, begin, through, from?.flow),
    tankBefore: from
      ? from.tankBefore
      : atOrBefore(inputs.tankVolume, startedAt, inputs.maxGapSeconds),
  };
}

function finishRun(
  inputs: PumpRunInputs,
  startedAt: number,
  endedAt: number | null,
  spansGap: boolean,
  carry: OpenRunCarry | null,
): DerivedPumpRun {
  const begin = carry?.through ?? startedAt;
  const lastT = endedAt ?? Number.POSITIVE_INFINITY;
  const meanCurrentA = meanOf(sumWithin(inputs.current, begin, lastT, carry?.current));
  const durationS = endedAt === null ? null : endedAt - startedAt;
  const meanVolts = meanOf(sumWithin(inputs.batteryVoltage, begin, lastT, carry?.volts));
  const energyWh =
    durationS !== null && meanCurrentA !== null && meanVolts !== null
      ? Math.max(0, (meanCurrentA * meanVolts * durationS) / 3600)
      : null;

  let waterM3: number | null = null;
  let waterSource: DerivedPumpRun['waterSource'] = null;
  const flow = sumWithin(inputs.flow, begin, lastT, carry?.flow);
  if (durationS !== null && flow.n > 0) {
    waterM3 = Math.max(0, (meanOf(flow) ?? 0) * durationS);
    waterSource = 'flow';
  } else if (endedAt !== null) {
    const before = carry
      ? carry.tankBefore
      : atOrBefore(inputs.tankVolume, startedAt, inputs.maxGapSeconds);
    const after = atOrBefore(inputs.tankVolume, endedAt, inputs.maxGapSeconds);
    if (before && after && after.t > before.t) {
      waterM3 = Math.max(0, after.v - before.v);
      waterSource = 'tank_rise';
    }
  }
  return { startedAt, endedAt, durationS, meanCurrentA, energyWh, waterM3, waterSource, spansGap };
}
