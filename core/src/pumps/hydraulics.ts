/**
 * Hydraulics for well and booster pumps, in SI: head from pressure, total dynamic head, water
 * power, wire-to-water efficiency, friction loss by Hazen–Williams, and airline depth readings.
 */
import {
  STANDARD_GRAVITY_METRES_PER_SECOND_SQUARED,
  WATER_DENSITY_KILOGRAMS_PER_CUBIC_METRE,
} from '../units.js';

const RHO_G = WATER_DENSITY_KILOGRAMS_PER_CUBIC_METRE * STANDARD_GRAVITY_METRES_PER_SECOND_SQUARED;

/** Head of water that a (gauge) pressure supports, metres: p / (ρ g). 1 psi ≈ 2.31 ft. */
export function pressureToHeadMetres(pascals: number): number {
  return pascals / RHO_G;
}

/** Pressure at the foot of a column of water, pascals: ρ g h. */
export function headToPressurePascals(headMetres: number): number {
  return headMetres * RHO_G;
}

/**
 * Depth from the well head to water by the airline method: airline length minus the head the
 * gauge pressure supports, metres.
 */
export function airlineDepthToWaterMetres(
  airlineLengthMetres: number,
  gaugePascals: number,
): number {
  return airlineLengthMetres - pressureToHeadMetres(gaugePascals);
}

/** The parts of total dynamic head, metres and pascals. */
export interface DynamicHeadParts {
  /** Depth from the well head down to the water at rest (static level), metres. */
  staticDepthToWaterMetres: number;
  /** How far the water falls below the static level while pumping, metres. */
  drawdownMetres: number;
  /** Height from the well head up to the discharge (tank inlet), metres. */
  riseToDischargeMetres: number;
  /** Friction losses in pipe and fittings, metres. */
  frictionHeadMetres: number;
  /** Gauge pressure required at the discharge (e.g. pressure tank cut-out), pascals. Default 0. */
  dischargePressurePascals?: number;
}

/**
 * Total dynamic head, metres: static level + drawdown + rise to discharge + friction + pressure
 * head (common practice).
 */
export function totalDynamicHeadMetres(parts: DynamicHeadParts): number {
  return (
    parts.staticDepthToWaterMetres +
    parts.drawdownMetres +
    parts.riseToDischargeMetres +
    parts.frictionHeadMetres +
    pressureToHeadMetres(parts.dischargePressurePascals ?? 0)
  );
}

/** Hydraulic (water) power, watts: P = ρ g Q H. */
export function waterPowerWatts(flowCubicMetresPerSecond: number, headMetres: number): number {
  return RHO_G * flowCubicMetresPerSecond * headMetres;
}

/**
 * Water horsepower by the US trade formula: gpm × TDH (ft) / 3960. Kept to cross-check the SI
 * form; use {@link waterPowerWatts} in code.
 */
export function waterHorsepowerFromGpmAndFeet(gpm: number, headFeet: number): number {
  return (gpm * headFeet) / 3960;
}

/**
 * Wire-to-water efficiency: hydraulic power out over electrical power in, 0–1. Null when the
 * electrical power is not positive.
 */
export function wireToWaterEfficiency(
  hydraulicWatts: number,
  electricalWatts: number,
): number | null {
  if (!(electricalWatts > 0) || !Number.isFinite(hydraulicWatts)) return null;
  return hydraulicWatts / electricalWatts;
}

/**
 * Friction head loss by Hazen–Williams (SI form), metres: h = 10.67 L Q^1.852 / (C^1.852 d^4.87),
 * L pipe length m, Q flow m³/s, d inside diameter m.
 */
export function hazenWilliamsHeadLossMetres(
  lengthMetres: number,
  flowCubicMetresPerSecond: number,
  roughnessC: number,
  insideDiameterMetres: number,
): number {
  if (!(roughnessC > 0) || !(insideDiameterMetres > 0)) return Number.NaN;
  return (
    (10.67 * lengthMetres * Math.abs(flowCubicMetresPerSecond) ** 1.852) /
    (roughnessC ** 1.852 * insideDiameterMetres ** 4.87)
  );
}

/**
 * Hazen–Williams in the US trade form, feet of head per 100 ft of pipe:
 * 0.2083 (100/C)^1.852 q^1.852 / d^4.8655 with q in gpm and d in inches. For cross-checks.
 */
export function hazenWilliamsFeetPer100FeetUs(
  gpm: number,
  roughnessC: number,
  insideDiameterInches: number,
): number {
  return (0.2083 * (100 / roughnessC) ** 1.852 * gpm ** 1.852) / insideDiameterInches ** 4.8655;
}

/** Pipe materials with a published Hazen–Williams C range for new pipe. */
export type PipeMaterial = 'plastic' | 'steel' | 'cast_iron' | 'galvanized_iron';

/** Hazen–Williams C for new pipe: [low, high] (EPANET 2.2 User Manual). */
export const HAZEN_WILLIAMS_C_NEW_PIPE: Readonly<Record<PipeMaterial, readonly [number, number]>> =
  {
    plastic: [140, 150],
    steel: [140, 150],
    cast_iron: [130, 140],
    galvanized_iron: [120, 120],
  };
