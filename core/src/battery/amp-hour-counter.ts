/**
 * Counting amp-hours between rests: the charge in and out of the bank, integrated from the
 * battery current (positive = charging), with a charge efficiency for the energy lost charging.
 * The count is re-anchored at each rest (or at float), and its uncertainty grows with the
 * amp-hours counted and with data gaps, which are not guessed across.
 */
import { type Sample, sortSamples } from '../series.js';
import { SECONDS_PER_HOUR } from '../units.js';
import { isLeadAcid } from './chemistry-curves.js';
import {
  type BatteryBankConfig,
  type RestVoltageOptions,
  type SocEstimate,
  socFromRestVoltage,
} from './state-of-charge.js';
import { type RestDetectionParams, latestRestedVoltage } from './rest-detection.js';
import type { ControllerStage } from '../telemetry/measurements.js';

/** Settings for amp-hour counting. */
export interface AmpHourParams {
  /** Fraction of charging amp-hours that end up stored. Default 0.85 lead-acid, 0.99 LiFePO4 (common practice). */
  chargeEfficiency?: number;
  /** Samples further apart than this are a gap and are not integrated across, seconds. Default 900. */
  maxGapSeconds?: number;
  /** Counting error per amp-hour counted (sensor gain and offset), fraction. Default 0.02. */
  driftFractionPerAmpHour?: number;
}

/** Amp-hours counted over a window. */
export interface AmpHourCount {
  /** Amp-hours into the bank before efficiency (≥ 0). */
  chargedAmpHours: number;
  /** Amp-hours out of the bank (≥ 0). */
  dischargedAmpHours: number;
  /** Stored change: charged × efficiency − discharged, amp-hours. */
  netAmpHours: number;
  /** Time not covered because of gaps between samples, seconds. */
  gapSeconds: number;
  fromT: number;
  toT: number;
}

/** The default charge efficiency of a chemistry. */
export function defaultChargeEfficiency(bank: BatteryBankConfig): number {
  return isLeadAcid(bank.chemistry) ? 0.85 : 0.99;
}

/**
 * Integrates battery current samples (A) over [fromT, toT] by the trapezoid rule. Intervals
 * longer than the gap limit are skipped and counted in `gapSeconds`.
 */
export function countAmpHours(
  bank: BatteryBankConfig,
  currents: readonly Sample[],
  fromT: number,
  toT: number,
  params: AmpHourParams = {},
): AmpHourCount {
  const efficiency = params.chargeEfficiency ?? defaultChargeEfficiency(bank);
  const maxGap = params.maxGapSeconds ?? 900;
  const points = sortSamples(currents).filter(
    (s) => Number.isFinite(s.t) && Number.isFinite(s.v) && s.t >= fromT && s.t <= toT,
  );
  let charged = 0;
  let discharged = 0;
  let gapSeconds = 0;
  const first = points[0];
  const last = points[points.length - 1];
  if (!first || !last) {
    return {
      chargedAmpHours: 0,
      dischargedAmpHours: 0,
      netAmpHours: 0,
      gapSeconds: Math.max(toT - fromT, 0),
      fromT,
      toT,
    };
  }
  gapSeconds += first.t - fromT > maxGap ? first.t - fromT : 0;
  gapSeconds += toT - last.t > maxGap ? toT - last.t : 0;
  for (let i = 1; i < points.length; i += 1) {
    const a = points[i - 1] as Sample;
    const b = points[i] as Sample;
    const dt = b.t - a.t;
    if (dt <= 0) continue;
    if (dt > maxGap) {
      gapSeconds += dt;
      continue;
    }
    // Split the trapezoid where the current crosses zero so charge and discharge stay apart.
    if (a.v * b.v < 0) {
      const tZero = (Math.abs(a.v) / (Math.abs(a.v) + Math.abs(b.v))) * dt;
      const first = (a.v * tZero) / 2 / SECONDS_PER_HOUR;
      const second = (b.v * (dt - tZero)) / 2 / SECONDS_PER_HOUR;
      for (const part of [first, second]) {
        if (part > 0) charged += part;
        else discharged -= part;
      }
    } else {
      const area = ((a.v + b.v) / 2) * (dt / SECONDS_PER_HOUR);
      if (area > 0) charged += area;
      else discharged -= area;
    }
  }
  return {
    chargedAmpHours: charged,
    dischargedAmpHours: discharged,
    netAmpHours: charged * efficiency - discharged,
    gapSeconds,
    fromT,
    toT,
  };
}

/** Where a count starts from: a time and the state of charge then. */
export interface SocAnchor {
  t: number;
  estimate: SocEstimate;
}

/**
 * State of charge at `toT` from an anchor and the amp-hours counted since. The band is the
 * anchor's band, widened by the drift per amp-hour counted and, for gaps, by the largest current
 * seen times the gap time. Clamped to 0–1.
 */
export function socFromAmpHours(
  bank: BatteryBankConfig,
  anchor: SocAnchor,
  currents: readonly Sample[],
  toT: number,
  params: AmpHourParams = {},
): SocEstimate {
  const base = anchor.estimate;
  if (base.socFraction === null || !(bank.capacityAmpHours > 0)) return base;
  const count = countAmpHours(bank, currents, anchor.t, toT, params);
  const capacity = bank.capacityAmpHours;
  const drift = params.driftFractionPerAmpHour ?? 0.02;
  const largest = currents.reduce(
    (m, s) => (Number.isFinite(s.v) ? Math.max(m, Math.abs(s.v)) : m),
    0,
  );
  const spread =
    (drift * (count.chargedAmpHours + count.dischargedAmpHours) +
      (largest * count.gapSeconds) / SECONDS_PER_HOUR) /
    capacity;
  const clamp = (x: number) => Math.min(1, Math.max(0, x));
  const soc = clamp(base.socFraction + count.netAmpHours / capacity);
  const low = clamp(base.lowFraction + count.netAmpHours / capacity - spread);
  const high = clamp(base.highFraction + count.netAmpHours / capacity + spread);
  return {
    socFraction: soc,
    lowFraction: Math.min(low, soc),
    highFraction: Math.max(high, soc),
    confidence: high - low <= 0.15 ? 'good' : 'wide',
    method: 'amp_hours',
    note:
      count.gapSeconds > 0
        ? `counted from ${describeAnchor(anchor)}, with ${Math.round(count.gapSeconds / 60)} min of missing data`
        : `counted from ${describeAnchor(anchor)}`,
  };
}

function describeAnchor(anchor: SocAnchor): string {
  return anchor.estimate.method === 'rest_voltage' ? 'the last rest' : 'the last full charge';
}

/** Everything {@link estimateStateOfCharge} can use. */
export interface SocInputs {
  bank: BatteryBankConfig;
  /** Battery voltage samples, volts. */
  voltages: readonly Sample[];
  /** Battery current samples, amperes (positive = charging); null or empty when not measured. */
  currents?: readonly Sample[] | null;
  /** Latest battery temperature, °C. */
  temperatureCelsius?: number;
  /** Charge controller stage samples; reaching 'float' re-anchors at full. */
  stages?: readonly Sample<ControllerStage>[];
  /** The time to estimate for, epoch seconds. */
  atT: number;
  /** Pre-dawn window to use as a rest when no current is measured. */
  preDawn?: { startT: number; endT: number } | null;
  rest?: RestDetectionParams;
  ampHours?: AmpHourParams;
  restVoltage?: RestVoltageOptions;
}

/**
 * Best state-of-charge estimate at `atT`: the latest anchor (a determinate rested-voltage reading
 * or the controller reaching float, taken as full) carried forward by counted amp-hours; without
 * current data, the latest rested (or pre-dawn) voltage alone; failing that, the latest voltage,
 * reported as a wide estimate because the bank was not at rest.
 */
export function estimateStateOfCharge(inputs: SocInputs): SocEstimate {
  const { bank, atT } = inputs;
  const currents = inputs.currents && inputs.currents.length > 0 ? inputs.currents : null;
  const restOptions: RestVoltageOptions = {
    ...inputs.restVoltage,
    ...(inputs.temperatureCelsius !== undefined
      ? { temperatureCelsius: inputs.temperatureCelsius }
      : {}),
  };
  const rested = latestRestedVoltage(bank, inputs.voltages, currents, atT, {
    ...inputs.rest,
    preDawn: inputs.preDawn ?? null,
  });
  const anchors: SocAnchor[] = [];
  let restEstimate: SocEstimate | null = null;
  if (rested) {
    restEstimate = socFromRestVoltage(bank, rested.volts, restOptions);
    if (rested.basis === 'pre_dawn') {
      restEstimate = {
        ...restEstimate,
        confidence: restEstimate.confidence === 'good' ? 'wide' : restEstimate.confidence,
        note: restEstimate.note || 'from the pre-dawn voltage; loads may have been on',
      };
    }
    if (restEstimate.socFraction !== null) anchors.push({ t: rested.t, estimate: restEstimate });
  }
  const floats = (inputs.stages ?? []).filter((s) => s.v === 'float' && s.t <= atT);
  const lastFloat = floats.reduce<Sample<ControllerStage> | null>(
    (best, s) => (best === null || s.t > best.t ? s : best),
    null,
  );
  if (lastFloat) {
    anchors.push({
      t: lastFloat.t,
      estimate: {
        socFraction: 1,
        lowFraction: 0.95,
        highFraction: 1,
        confidence: 'good',
        method: 'amp_hours',
        note: 'controller in float',
      },
    });
  }
  const anchor = anchors.sort((a, b) => b.t - a.t)[0];
  if (anchor && currents) return socFromAmpHours(bank, anchor, currents, atT, inputs.ampHours);
  if (anchor && !currents) return anchor.estimate;
  if (restEstimate) return restEstimate;
  const latest = sortSamples(inputs.voltages)
    .filter((s) => s.t <= atT && Number.isFinite(s.v))
    .pop();
  if (!latest) {
    return {
      socFraction: null,
      lowFraction: 0,
      highFraction: 1,
      confidence: 'indeterminate',
      method: 'rest_voltage',
      note: 'no battery voltage',
    };
  }
  const loaded = socFromRestVoltage(bank, latest.v, restOptions);
  if (loaded.socFraction === null) return loaded;
  return {
    ...loaded,
    lowFraction: Math.max(0, loaded.lowFraction - 0.1),
    highFraction: Math.min(1, loaded.highFraction + 0.1),
    confidence: 'wide',
    note: 'the bank was not at rest; the figure is rough',
  };
}
