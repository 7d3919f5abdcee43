/**
 * Pressure (bladder) tank drawdown by Boyle's law: the water delivered between the pump's
 * cut-out and cut-in pressures, with the air precharge; absolute pressures throughout.
 */
import { STANDARD_ATMOSPHERE_PASCALS } from '../units.js';

/** A pressure tank and its switch settings (gauge pressures, pascals). */
export interface PressureTankSettings {
  /** Total tank volume, m³. */
  tankCubicMetres: number;
  /** Air precharge with the tank empty of water, gauge pascals. */
  prechargePascals: number;
  /** Pressure at which the pump starts, gauge pascals. */
  cutInPascals: number;
  /** Pressure at which the pump stops, gauge pascals. */
  cutOutPascals: number;
  /** Atmospheric pressure at the site, pascals. Default: standard atmosphere. */
  atmosphericPascals?: number;
}

/** Atmospheric pressure at an elevation (standard atmosphere), pascals. */
export function atmosphericPressureAtElevationPascals(elevationMetres: number): number {
  return STANDARD_ATMOSPHERE_PASCALS * (1 - 2.25577e-5 * elevationMetres) ** 5.25588;
}

/**
 * Drawdown of a pressure tank, m³: V (P1/P2 − P1/P3) with P1 precharge, P2 cut-in, P3 cut-out,
 * all absolute. Null when the settings are not in order (precharge ≤ cut-in < cut-out).
 */
export function pressureTankDrawdownCubicMetres(settings: PressureTankSettings): number | null {
  const atmosphere = settings.atmosphericPascals ?? STANDARD_ATMOSPHERE_PASCALS;
  const p1 = settings.prechargePascals + atmosphere;
  const p2 = settings.cutInPascals + atmosphere;
  const p3 = settings.cutOutPascals + atmosphere;
  if (!(p1 > 0) || p1 > p2 || !(p3 > p2) || !(settings.tankCubicMetres > 0)) return null;
  return settings.tankCubicMetres * (p1 / p2 - p1 / p3);
}

/**
 * How long the pump runs to refill the drawdown, seconds, at a pump flow and a steady draw
 * (both m³/s). Null when the pump cannot keep ahead of the draw. Aim for at least 60 s (common
 * practice).
 */
export function pressureTankCycleRunSeconds(
  drawdownCubicMetres: number,
  pumpFlowCubicMetresPerSecond: number,
  drawCubicMetresPerSecond = 0,
): number | null {
  const net = pumpFlowCubicMetresPerSecond - drawCubicMetresPerSecond;
  if (!(net > 0) || !(drawdownCubicMetres >= 0)) return null;
  return drawdownCubicMetres / net;
}
