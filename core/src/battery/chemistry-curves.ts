/**
 * Battery chemistries and their rested (open-circuit) voltage curves, per cell. Lead-acid banks
 * are built from 2 V cells, LiFePO4 banks from 3.2 V cells; a bank's curve is the cell curve
 * times the cells in series.
 */

/** Battery chemistries Wellkept knows. */
export type BatteryChemistry = 'flooded' | 'agm' | 'gel' | 'lifepo4';

/** Every chemistry, for forms. */
export const BATTERY_CHEMISTRIES: readonly BatteryChemistry[] = [
  'flooded',
  'agm',
  'gel',
  'lifepo4',
];

/** A point of a rest-voltage curve: state of charge (0–1) and cell volts. */
export interface CurvePoint {
  socFraction: number;
  cellVolts: number;
}

/** A rested open-circuit voltage curve for one cell. */
export interface RestVoltageCurve {
  chemistry: BatteryChemistry;
  /** Points in rising order of state of charge. */
  points: readonly CurvePoint[];
  /** Cell temperature the curve was taken at, °C. */
  referenceCelsius: number;
  /** Where the figures come from. */
  source: string;
}

/** Nominal volts of one cell. */
export function nominalCellVolts(chemistry: BatteryChemistry): number {
  return chemistry === 'lifepo4' ? 3.2 : 2;
}

/** Returns true for the lead-acid chemistries (flooded, AGM, gel). */
export function isLeadAcid(chemistry: BatteryChemistry): boolean {
  return chemistry !== 'lifepo4';
}

const fromTwelveVolt = (pairs: [number, number][]): CurvePoint[] =>
  pairs.map(([percent, volts]) => ({ socFraction: percent / 100, cellVolts: volts / 6 }));

/**
 * Flooded lead-acid at 80 °F (26.7 °C), from the usual 12 V table: 100 % 12.65 · 75 % 12.45 ·
 * 50 % 12.24 · 25 % 12.06 · 0 % 11.89 V (common practice: widely reproduced industry table).
 */
export const FLOODED_REST_CURVE: RestVoltageCurve = {
  chemistry: 'flooded',
  points: fromTwelveVolt([
    [0, 11.89],
    [25, 12.06],
    [50, 12.24],
    [75, 12.45],
    [100, 12.65],
  ]),
  referenceCelsius: (80 - 32) * (5 / 9),
  source: 'common practice: widely reproduced industry table (12 V figures ÷ 6 per cell)',
};

/**
 * AGM at 25 °C (common practice, approximate makers' tables; AGM rests a little higher than
 * flooded): 100 % 12.80 · 75 % 12.55 · 50 % 12.30 · 25 % 12.05 · 0 % 11.80 V.
 */
export const AGM_REST_CURVE: RestVoltageCurve = {
  chemistry: 'agm',
  points: fromTwelveVolt([
    [0, 11.8],
    [25, 12.05],
    [50, 12.3],
    [75, 12.55],
    [100, 12.8],
  ]),
  referenceCelsius: 25,
  source: "common practice: approximate makers' tables for AGM",
};

/**
 * Gel at 25 °C (common practice, approximate makers' tables): 100 % 12.85 · 75 % 12.60 ·
 * 50 % 12.35 · 25 % 12.10 · 0 % 11.90 V.
 */
export const GEL_REST_CURVE: RestVoltageCurve = {
  chemistry: 'gel',
  points: fromTwelveVolt([
    [0, 11.9],
    [25, 12.1],
    [50, 12.35],
    [75, 12.6],
    [100, 12.85],
  ]),
  referenceCelsius: 25,
  source: "common practice: approximate makers' tables for gel",
};

/**
 * LiFePO4 cell rest voltage from 0 % to 100 % in 10 % steps (a widely used default LFP curve
 * published with an open-source embedded operating system's battery bindings). Flat between
 * 20 % and 90 %: 0.10 V per cell across 70 % of the capacity.
 */
export const LIFEPO4_REST_CURVE: RestVoltageCurve = {
  chemistry: 'lifepo4',
  points: [2.013, 3.068, 3.159, 3.194, 3.21, 3.221, 3.229, 3.246, 3.256, 3.262, 3.348].map(
    (cellVolts, i) => ({ socFraction: i / 10, cellVolts }),
  ),
  referenceCelsius: 25,
  source: 'default LFP curve of an open-source RTOS battery binding (published)',
};

/** The rest-voltage curve of a chemistry. */
export function restVoltageCurve(chemistry: BatteryChemistry): RestVoltageCurve {
  switch (chemistry) {
    case 'flooded':
      return FLOODED_REST_CURVE;
    case 'agm':
      return AGM_REST_CURVE;
    case 'gel':
      return GEL_REST_CURVE;
    case 'lifepo4':
      return LIFEPO4_REST_CURVE;
  }
}

/**
 * State of charge (0–1) at a cell voltage by straight-line interpolation on the curve, clamped to
 * the ends.
 */
export function socFractionFromCellVolts(curve: RestVoltageCurve, cellVolts: number): number {
  const points = curve.points;
  const first = points[0] as CurvePoint;
  const last = points[points.length - 1] as CurvePoint;
  if (cellVolts <= first.cellVolts) return first.socFraction;
  if (cellVolts >= last.cellVolts) return last.socFraction;
  for (let i = 1; i < points.length; i += 1) {
    const hi = points[i] as CurvePoint;
    const lo = points[i - 1] as CurvePoint;
    if (cellVolts <= hi.cellVolts) {
      const share = (cellVolts - lo.cellVolts) / (hi.cellVolts - lo.cellVolts);
      return lo.socFraction + share * (hi.socFraction - lo.socFraction);
    }
  }
  return last.socFraction;
}

/** Cell voltage at a state of charge (0–1), by interpolation on the curve, clamped to the ends. */
export function cellVoltsFromSocFraction(curve: RestVoltageCurve, socFraction: number): number {
  const points = curve.points;
  const first = points[0] as CurvePoint;
  const last = points[points.length - 1] as CurvePoint;
  if (socFraction <= first.socFraction) return first.cellVolts;
  if (socFraction >= last.socFraction) return last.cellVolts;
  for (let i = 1; i < points.length; i += 1) {
    const hi = points[i] as CurvePoint;
    const lo = points[i - 1] as CurvePoint;
    if (socFraction <= hi.socFraction) {
      const share = (socFraction - lo.socFraction) / (hi.socFraction - lo.socFraction);
      return lo.cellVolts + share * (hi.cellVolts - lo.cellVolts);
    }
  }
  return last.cellVolts;
}

/**
 * Flooded cell open-circuit voltage from electrolyte specific gravity: OCV ≈ SG + 0.84 V
 * (common practice rule of thumb; 1.265 → 2.105 V).
 */
export function cellVoltsFromSpecificGravity(specificGravity: number): number {
  return specificGravity + 0.84;
}
