/**
 * One night of a battery bank: voltage at dusk and at dawn, the drop between, the lowest point,
 * the state of charge at dawn and the depth of discharge the night took. The night itself
 * (sunset to next sunrise at the site) comes from sun/daylight.ts.
 */
import { type Sample, sortSamples } from '../series.js';
import {
  type BatteryBankConfig,
  type RestVoltageOptions,
  type SocEstimate,
  socFromRestVoltage,
} from './state-of-charge.js';
import { type AmpHourParams, countAmpHours } from './amp-hour-counter.js';

/** A time window, epoch seconds. */
export interface TimeWindow {
  startT: number;
  endT: number;
}

/** What happened to the bank over one night. */
export interface OvernightSummary {
  window: TimeWindow;
  /** Mean voltage over the first averaging span after dusk, volts. */
  duskVolts: number;
  /** Mean voltage over the last averaging span before dawn, volts. */
  dawnVolts: number;
  /** duskVolts − dawnVolts (positive when the bank lost voltage), volts. */
  dropVolts: number;
  minVolts: number;
  minT: number;
  /** State of charge from the dawn voltage (the bank is close to rest before sunrise). */
  dawnSoc: SocEstimate;
  /** Amp-hours taken from the bank overnight, or null without current data. */
  dischargedAmpHours: number | null;
  /** Discharged amp-hours / capacity (0–1), or, without current data, the fall in estimated state of charge; null when neither is known. */
  depthOfDischargeFraction: number | null;
  depthOfDischargeBasis: 'amp_hours' | 'voltage' | null;
  samples: number;
}

/** Settings for {@link overnightSummary}. */
export interface OvernightOptions {
  /** How long to average at each end, seconds. Default 1800. */
  averagingSeconds?: number;
  restVoltage?: RestVoltageOptions;
  ampHours?: AmpHourParams;
}

/**
 * Summarises a night from battery voltage samples (and current samples, when measured). Null when
 * there are no voltage samples near both ends of the window.
 */
export function overnightSummary(
  bank: BatteryBankConfig,
  voltages: readonly Sample[],
  currents: readonly Sample[] | null,
  window: TimeWindow,
  options: OvernightOptions = {},
): OvernightSummary | null {
  const span = options.averagingSeconds ?? 1800;
  const inside = sortSamples(voltages).filter(
    (s) => Number.isFinite(s.v) && s.t >= window.startT && s.t <= window.endT,
  );
  const dusk = inside.filter((s) => s.t <= window.startT + span);
  const dawn = inside.filter((s) => s.t >= window.endT - span);
  if (dusk.length === 0 || dawn.length === 0) return null;
  const mean = (xs: Sample[]) => xs.reduce((sum, s) => sum + s.v, 0) / xs.length;
  const duskVolts = mean(dusk);
  const dawnVolts = mean(dawn);
  let min = inside[0] as Sample;
  for (const s of inside) if (s.v < min.v) min = s;
  const dawnSoc = socFromRestVoltage(bank, dawnVolts, options.restVoltage);
  let discharged: number | null = null;
  let depth: number | null = null;
  let basis: OvernightSummary['depthOfDischargeBasis'] = null;
  if (currents && currents.length > 0 && bank.capacityAmpHours > 0) {
    const count = countAmpHours(bank, currents, window.startT, window.endT, options.ampHours);
    discharged = count.dischargedAmpHours;
    depth = Math.min(1, discharged / bank.capacityAmpHours);
    basis = 'amp_hours';
  } else {
    const duskSoc = socFromRestVoltage(bank, duskVolts, options.restVoltage);
    if (duskSoc.socFraction !== null && dawnSoc.socFraction !== null) {
      depth = Math.max(0, duskSoc.socFraction - dawnSoc.socFraction);
      basis = 'voltage';
    }
  }
  return {
    window,
    duskVolts,
    dawnVolts,
    dropVolts: duskVolts - dawnVolts,
    minVolts: min.v,
    minT: min.t,
    dawnSoc,
    dischargedAmpHours: discharged,
    depthOfDischargeFraction: depth,
    depthOfDischargeBasis: basis,
    samples: inside.length,
  };
}
