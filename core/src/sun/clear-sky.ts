/**
 * Clear-sky global horizontal irradiance by the Haurwitz (1945) model: one of the simplest
 * models, needing only the sun's apparent zenith angle.
 */

/**
 * Clear-sky GHI, W/m²: 1098 cos z · exp(−0.059 / cos z) with z the apparent zenith angle;
 * 0 when the sun is at or below the horizon.
 */
export function haurwitzClearSkyGhi(apparentZenithDegrees: number): number {
  if (!Number.isFinite(apparentZenithDegrees)) return 0;
  const cosZ = Math.cos((apparentZenithDegrees * Math.PI) / 180);
  if (cosZ <= 0) return 0;
  return 1098 * cosZ * Math.exp(-0.059 / cosZ);
}
