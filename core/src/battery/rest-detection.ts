/**
 * When is a battery "rested"? Its terminal voltage means something only after the current has
 * been near zero long enough for surface charge to fade. Either a measured rest (|current| under
 * a threshold for long enough) or, without a current sensor, the pre-dawn window.
 */
import { type Sample, sortSamples } from '../series.js';
import type { BatteryBankConfig } from './state-of-charge.js';
import { isLeadAcid } from './chemistry-curves.js';

/** Settings for rest detection. */
export interface RestDetectionParams {
  /** |current| at or below this counts as resting, amperes. Default: capacity / 100 (C/100), at least 0.2 A. */
  maxRestAmps?: number;
  /** How long the current must stay low, seconds. Default 2 h lead-acid, 30 min LiFePO4 (common practice). */
  minRestSeconds?: number;
  /** Samples further apart than this break a rest (a data gap), seconds. Default 900. */
  maxGapSeconds?: number;
}

/** A stretch of time the battery rested. */
export interface RestPeriod {
  /** When the current fell to near zero, epoch seconds. */
  startT: number;
  /** The last low-current sample, epoch seconds. */
  endT: number;
}

/** The rest-detection settings with defaults filled in for a bank. */
export function restDetectionDefaults(
  bank: BatteryBankConfig,
  params: RestDetectionParams = {},
): Required<RestDetectionParams> {
  return {
    maxRestAmps: params.maxRestAmps ?? Math.max(0.2, bank.capacityAmpHours / 100),
    minRestSeconds: params.minRestSeconds ?? (isLeadAcid(bank.chemistry) ? 7200 : 1800),
    maxGapSeconds: params.maxGapSeconds ?? 900,
  };
}

/**
 * Periods when the bank has rested: runs of current samples (A) with |I| at or below the
 * threshold, without data gaps, lasting at least the minimum rest. Only the part after the
 * minimum rest counts as rested: `startT` is when resting began, the voltage is trustworthy from
 * `startT + minRestSeconds` to `endT`.
 */
export function findRestPeriods(
  bank: BatteryBankConfig,
  currents: readonly Sample[],
  params: RestDetectionParams = {},
): RestPeriod[] {
  const p = restDetectionDefaults(bank, params);
  const periods: RestPeriod[] = [];
  let start: number | null = null;
  let last: number | null = null;
  const close = () => {
    if (start !== null && last !== null && last - start >= p.minRestSeconds) {
      periods.push({ startT: start, endT: last });
    }
    start = null;
    last = null;
  };
  for (const s of sortSamples(currents)) {
    if (!Number.isFinite(s.v) || !Number.isFinite(s.t)) continue;
    if (last !== null && s.t - last > p.maxGapSeconds) close();
    if (Math.abs(s.v) <= p.maxRestAmps) {
      if (start === null) start = s.t;
      last = s.t;
    } else {
      close();
    }
  }
  close();
  return periods;
}

/** A voltage reading taken while rested, with how it was judged rested. */
export interface RestedVoltage {
  t: number;
  volts: number;
  basis: 'measured_rest' | 'pre_dawn';
}

/**
 * The latest rested voltage at or before `atT`: the last voltage inside a measured rest (after
 * the minimum rest time), or, when no current data are given, the mean voltage of the pre-dawn
 * window (the hour before sunrise; loads may still be on, so it reads a little low).
 */
export function latestRestedVoltage(
  bank: BatteryBankConfig,
  voltages: readonly Sample[],
  currents: readonly Sample[] | null,
  atT: number,
  options: RestDetectionParams & { preDawn?: { startT: number; endT: number } | null } = {},
): RestedVoltage | null {
  const p = restDetectionDefaults(bank, options);
  const usable = sortSamples(voltages).filter(
    (s) => Number.isFinite(s.v) && Number.isFinite(s.t) && s.t <= atT,
  );
  if (currents && currents.length > 0) {
    const rests = findRestPeriods(
      bank,
      currents.filter((s) => s.t <= atT),
      p,
    );
    for (let i = rests.length - 1; i >= 0; i -= 1) {
      const rest = rests[i] as RestPeriod;
      const settled = rest.startT + p.minRestSeconds;
      const inside = usable.filter((s) => s.t >= settled && s.t <= rest.endT);
      const lastInside = inside[inside.length - 1];
      if (lastInside) return { t: lastInside.t, volts: lastInside.v, basis: 'measured_rest' };
    }
    return null;
  }
  const window = options.preDawn;
  if (!window) return null;
  const inside = usable.filter((s) => s.t >= window.startT && s.t <= window.endT);
  const lastInside = inside[inside.length - 1];
  if (!lastInside) return null;
  const mean = inside.reduce((sum, s) => sum + s.v, 0) / inside.length;
  return { t: lastInside.t, volts: mean, basis: 'pre_dawn' };
}
