/**
 * The columns of `tanks as t` that core's `tankGeometryFrom` reads, under the names it reads
 * them by, for a Kysely select.
 */
export const TANK_DIMENSION_COLUMNS = [
  't.geometry as shape',
  't.diameter_m as diameterMetres',
  't.length_m as lengthMetres',
  't.width_m as widthMetres',
  't.height_m as heightMetres',
] as const;
