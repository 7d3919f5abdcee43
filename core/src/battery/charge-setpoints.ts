/**
 * Charge-stage voltage setpoints per chemistry, with temperature compensation for lead-acid.
 * The compensation coefficient is a setting (−3 to −5 mV/°C per cell around 25 °C).
 */
import type { BatteryChemistry } from './chemistry-curves.js';
import { isLeadAcid } from './chemistry-curves.js';
import { type BatteryBankConfig, cellsInSeries } from './state-of-charge.js';

/** Per-cell setpoints at 25 °C, volts. */
export interface CellSetpoints {
  absorptionVoltsPerCell: number;
  floatVoltsPerCell: number;
  /** Null when the chemistry must not be equalised. */
  equalizeVoltsPerCell: number | null;
}

/**
 * Default per-cell setpoints at 25 °C (common practice, makers' tables): gel absorption 2.40,
 * float 2.25 V/cell; AGM 2.40 / 2.25; flooded 2.45 / 2.22 with equalise 2.58; LiFePO4 3.55 / 3.375.
 */
export const DEFAULT_CELL_SETPOINTS: Readonly<Record<BatteryChemistry, CellSetpoints>> = {
  flooded: { absorptionVoltsPerCell: 2.45, floatVoltsPerCell: 2.22, equalizeVoltsPerCell: 2.58 },
  agm: { absorptionVoltsPerCell: 2.4, floatVoltsPerCell: 2.25, equalizeVoltsPerCell: null },
  gel: { absorptionVoltsPerCell: 2.4, floatVoltsPerCell: 2.25, equalizeVoltsPerCell: null },
  lifepo4: { absorptionVoltsPerCell: 3.55, floatVoltsPerCell: 3.375, equalizeVoltsPerCell: null },
};

/** Temperature compensation reference, °C. */
export const COMPENSATION_REFERENCE_CELSIUS = 25;
/** Default compensation for lead-acid, mV/°C per cell (common in charger manuals; −3 is the published floor). */
export const DEFAULT_COMPENSATION_MILLIVOLTS_PER_CELSIUS_PER_CELL = -5;

/** Settings for {@link chargeSetpoints}. */
export interface ChargeSetpointOptions {
  /** Battery temperature, °C; without it no compensation is applied. */
  temperatureCelsius?: number;
  /** mV/°C per cell; default −5 for lead-acid, 0 for LiFePO4. */
  compensationMillivoltsPerCelsiusPerCell?: number;
  /** Per-cell setpoints to use instead of the defaults. */
  cellSetpoints?: Partial<CellSetpoints>;
}

/** Bank setpoints in volts. */
export interface ChargeSetpoints {
  absorptionVolts: number;
  floatVolts: number;
  equalizeVolts: number | null;
  /** Compensation applied to each setpoint, volts (0 when none). */
  compensationVolts: number;
}

/**
 * Bank charge setpoints: per-cell setpoints × cells in series, plus temperature compensation
 * coefficient × (T − 25 °C) × cells. Example: 24 V gel, 28.80 V at 25 °C, −5 mV/°C/cell → 28.20 V
 * at 35 °C, 30.30 V at 0 °C.
 */
export function chargeSetpoints(
  bank: BatteryBankConfig,
  options: ChargeSetpointOptions = {},
): ChargeSetpoints {
  const cells = cellsInSeries(bank);
  const base = { ...DEFAULT_CELL_SETPOINTS[bank.chemistry], ...options.cellSetpoints };
  const coefficient =
    options.compensationMillivoltsPerCelsiusPerCell ??
    (isLeadAcid(bank.chemistry) ? DEFAULT_COMPENSATION_MILLIVOLTS_PER_CELSIUS_PER_CELL : 0);
  const t = options.temperatureCelsius;
  const compensation =
    t !== undefined && Number.isFinite(t)
      ? (coefficient / 1000) * (t - COMPENSATION_REFERENCE_CELSIUS) * cells
      : 0;
  const round = (v: number) => Math.round(v * 1e6) / 1e6 + 0; // + 0 turns −0 into 0
  return {
    absorptionVolts: round(base.absorptionVoltsPerCell * cells + compensation),
    floatVolts: round(base.floatVoltsPerCell * cells + compensation),
    equalizeVolts:
      base.equalizeVoltsPerCell === null
        ? null
        : round(base.equalizeVoltsPerCell * cells + compensation),
    compensationVolts: round(compensation),
  };
}
