/**
 * State of charge from rested voltage, scaled to the bank, with temperature correction and an
 * honest uncertainty: a LiFePO4 bank resting on its flat plateau gives "indeterminate", not a
 * sharp figure.
 */
import {
  type BatteryChemistry,
  isLeadAcid,
  nominalCellVolts,
  restVoltageCurve,
  socFractionFromCellVolts,
  cellVoltsFromSocFraction,
} from './chemistry-curves.js';

/** A battery bank as configured at a site. */
export interface BatteryBankConfig {
  chemistry: BatteryChemistry;
  /** Nominal bank voltage: 12, 24, 48 … volts. */
  nominalVolts: number;
  /** Rated capacity, amp-hours (20-hour rate for lead-acid). */
  capacityAmpHours: number;
  /** Cells in series, when it is not nominal volts / cell volts. */
  cellsInSeries?: number;
}

/**
 * Cells in series: nominal volts / 2 for lead-acid, / 3.2 for LiFePO4 (rounded), unless the bank
 * says otherwise.
 */
export function cellsInSeries(bank: BatteryBankConfig): number {
  if (bank.cellsInSeries !== undefined && bank.cellsInSeries > 0) return bank.cellsInSeries;
  return Math.max(1, Math.round(bank.nominalVolts / nominalCellVolts(bank.chemistry)));
}

/** Nominal stored energy of a bank, watt-hours: nominal volts × amp-hours. */
export function bankEnergyWattHours(bank: BatteryBankConfig): number {
  return bank.nominalVolts * bank.capacityAmpHours;
}

/** How sure an estimate is. */
export type SocConfidence = 'good' | 'wide' | 'indeterminate';

/** A state-of-charge estimate with its band. */
export interface SocEstimate {
  /** Best estimate 0–1, or null when indeterminate. */
  socFraction: number | null;
  /** Lower and upper bounds of the band, 0–1. */
  lowFraction: number;
  highFraction: number;
  confidence: SocConfidence;
  method: 'rest_voltage' | 'amp_hours';
  /** One line for a screen, e.g. why the band is wide. */
  note: string;
}

/** Settings for {@link socFromRestVoltage}. */
export interface RestVoltageOptions {
  /** Battery temperature, °C; when given the voltage is corrected to the curve's temperature. */
  temperatureCelsius?: number;
  /**
   * Change of rested cell voltage with temperature, V/°C per cell. Default +0.0002 for
   * lead-acid (memory: the cell's thermodynamic coefficient), 0 for LiFePO4. A setting.
   */
  restTemperatureCoefficientVoltsPerCelsiusPerCell?: number;
  /** Voltage reading uncertainty per cell, volts. Default 0.005. */
  readingUncertaintyVoltsPerCell?: number;
  /** Uncertainty of the curve itself, as a fraction of charge. Default 0.03 (the tables round). */
  curveUncertaintyFraction?: number;
}

/** The plateau of LiFePO4 where rest voltage says almost nothing: 20 % to 90 %. */
export const LIFEPO4_PLATEAU = { lowFraction: 0.2, highFraction: 0.9 } as const;

/** Band widths above this are reported as 'wide'. */
const GOOD_BAND_WIDTH = 0.15;

/** Bank voltage corrected to the temperature of the chemistry's rest curve, volts. */
export function restVoltsAtReferenceTemperature(
  bank: BatteryBankConfig,
  volts: number,
  options: RestVoltageOptions = {},
): number {
  const curve = restVoltageCurve(bank.chemistry);
  const t = options.temperatureCelsius;
  if (t === undefined || !Number.isFinite(t)) return volts;
  const coefficient =
    options.restTemperatureCoefficientVoltsPerCelsiusPerCell ??
    (isLeadAcid(bank.chemistry) ? 0.0002 : 0);
  return volts + coefficient * (curve.referenceCelsius - t) * cellsInSeries(bank);
}

/**
 * State of charge of a bank from its rested voltage (volts across the bank), interpolated on the
 * chemistry's curve, per cell. Returns a band: reading and table uncertainty for lead-acid; for
 * LiFePO4 on its plateau (20–90 %) the estimate is indeterminate. A non-finite voltage gives an
 * indeterminate estimate over 0–1.
 */
export function socFromRestVoltage(
  bank: BatteryBankConfig,
  volts: number,
  options: RestVoltageOptions = {},
): SocEstimate {
  if (!Number.isFinite(volts) || !(bank.nominalVolts > 0)) {
    return {
      socFraction: null,
      lowFraction: 0,
      highFraction: 1,
      confidence: 'indeterminate',
      method: 'rest_voltage',
      note: 'no usable voltage',
    };
  }
  const curve = restVoltageCurve(bank.chemistry);
  const cells = cellsInSeries(bank);
  const cellVolts = restVoltsAtReferenceTemperature(bank, volts, options) / cells;
  const delta = options.readingUncertaintyVoltsPerCell ?? 0.005;
  const curveBand = options.curveUncertaintyFraction ?? 0.03;
  const soc = socFractionFromCellVolts(curve, cellVolts);

  if (bank.chemistry === 'lifepo4') {
    const plateauLow = cellVoltsFromSocFraction(curve, LIFEPO4_PLATEAU.lowFraction);
    const plateauHigh = cellVoltsFromSocFraction(curve, LIFEPO4_PLATEAU.highFraction);
    if (cellVolts + delta > plateauLow && cellVolts - delta < plateauHigh) {
      return {
        socFraction: null,
        lowFraction: LIFEPO4_PLATEAU.lowFraction,
        highFraction: LIFEPO4_PLATEAU.highFraction,
        confidence: 'indeterminate',
        method: 'rest_voltage',
        note: 'LiFePO4 rests on a flat plateau between 20 % and 90 %; the voltage cannot tell where',
      };
    }
  }
  const low = Math.max(0, socFractionFromCellVolts(curve, cellVolts - delta) - curveBand);
  const high = Math.min(1, socFractionFromCellVolts(curve, cellVolts + delta) + curveBand);
  const top = curve.points[curve.points.length - 1]?.cellVolts ?? Number.POSITIVE_INFINITY;
  const bottom = curve.points[0]?.cellVolts ?? Number.NEGATIVE_INFINITY;
  const note =
    cellVolts > top
      ? 'voltage above the full mark: the bank may not have rested long enough after charging'
      : cellVolts < bottom
        ? 'voltage below the empty mark'
        : '';
  return {
    socFraction: soc,
    lowFraction: low,
    highFraction: high,
    confidence: high - low <= GOOD_BAND_WIDTH ? 'good' : 'wide',
    method: 'rest_voltage',
    note,
  };
}

/** Rested bank voltage at a state of charge (0–1), volts, at the curve's temperature. */
export function restVoltsFromSoc(bank: BatteryBankConfig, socFraction: number): number {
  return (
    cellVoltsFromSocFraction(restVoltageCurve(bank.chemistry), socFraction) * cellsInSeries(bank)
  );
}
