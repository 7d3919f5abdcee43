/**
 * DC voltage drop of a two-wire run (out and back) from the conductor resistance table:
 * uncoated copper at 75 °C, NEC (NFPA 70) Chapter 9, Table 8, ohms per 1000 ft, with the
 * stranded and solid columns kept apart.
 */
import { METRES_PER_FOOT } from '../units.js';

/** Conductor sizes in the table. */
export type ConductorSize = '14' | '12' | '10' | '8' | '6' | '4' | '2' | '1' | '1/0';
/** Stranding column of the table. */
export type Stranding = 'stranded' | 'solid';

/** Ω per 1000 ft, uncoated copper, 75 °C, stranded column (NEC Chapter 9, Table 8). */
export const COPPER_STRANDED_OHMS_PER_1000_FEET: Readonly<Record<ConductorSize, number>> = {
  '14': 3.14,
  '12': 1.98,
  '10': 1.24,
  '8': 0.778,
  '6': 0.491,
  '4': 0.308,
  '2': 0.194,
  '1': 0.154,
  '1/0': 0.122,
};

/** Ω per 1000 ft, uncoated copper, 75 °C, solid column (NEC Chapter 9, Table 8). */
export const COPPER_SOLID_OHMS_PER_1000_FEET: Readonly<Partial<Record<ConductorSize, number>>> = {
  '14': 3.07,
  '12': 1.93,
  '10': 1.21,
  '8': 0.764,
};

/** Default warning limit for voltage drop, percent (NEC 210.19(A) Informational Note No. 4: 3 % on a branch). */
export const DEFAULT_VOLTAGE_DROP_LIMIT_PERCENT = 3;

/** Resistance of one conductor, ohms per metre; null when the size is not in that column. */
export function conductorOhmsPerMetre(
  size: ConductorSize,
  stranding: Stranding = 'stranded',
): number | null {
  const perThousandFeet =
    stranding === 'stranded'
      ? COPPER_STRANDED_OHMS_PER_1000_FEET[size]
      : COPPER_SOLID_OHMS_PER_1000_FEET[size];
  return perThousandFeet === undefined ? null : perThousandFeet / (1000 * METRES_PER_FOOT);
}

/** A DC wire run. */
export interface WireRun {
  /** One-way length from source to load, metres. */
  oneWayMetres: number;
  amps: number;
  size: ConductorSize;
  stranding?: Stranding;
  /** System voltage, volts, for the percentage. */
  systemVolts: number;
  /** Warning limit, percent. Default 3. */
  limitPercent?: number;
}

/** Voltage drop of a run. */
export interface VoltageDrop {
  volts: number;
  /** Drop as a percentage of the system voltage. */
  percent: number;
  /** True when the drop is above the limit. */
  overLimit: boolean;
  limitPercent: number;
}

/**
 * Two-wire DC voltage drop: Vd = 2 × one-way length × current × resistance per length.
 * Null when the conductor size is not in the chosen column or the system voltage is not positive.
 */
export function twoWireVoltageDrop(run: WireRun): VoltageDrop | null {
  const ohmsPerMetre = conductorOhmsPerMetre(run.size, run.stranding ?? 'stranded');
  if (ohmsPerMetre === null || !(run.systemVolts > 0)) return null;
  const volts = 2 * run.oneWayMetres * run.amps * ohmsPerMetre;
  const percent = (volts / run.systemVolts) * 100;
  const limitPercent = run.limitPercent ?? DEFAULT_VOLTAGE_DROP_LIMIT_PERCENT;
  return { volts, percent, overLimit: percent > limitPercent, limitPercent };
}
