/**
 * What a PV array should produce: rated watts × irradiance on the array / 1000 W/m² × derate.
 * On clear days the plane-of-array irradiance is estimated from clear-sky GHI with a fixed
 * diffuse share (an approximation good enough to tell "should be charging" from "is not").
 */
import { type SiteLocation, type SolarPositionOptions, solarPosition } from './solar-position.js';
import { haurwitzClearSkyGhi } from './clear-sky.js';

/** A PV array as installed. */
export interface PvArrayConfig {
  /** Equipment key, the `<array>` in `pv/<array>/…`. */
  key: string;
  /** Nameplate power at standard test conditions (1000 W/m², 25 °C), watts. */
  ratedWatts: number;
  /** Tilt from horizontal, degrees (0 flat). Default 0. */
  tiltDegrees?: number;
  /** Direction the array faces, degrees from north eastward (180 = south). Default 180. */
  azimuthDegrees?: number;
  /** Losses from wiring, soiling, heat and the controller, as a factor 0–1. Default 0.75 (common practice). */
  derate?: number;
}

/** Default derate for small off-grid arrays (common practice). */
export const DEFAULT_PV_DERATE = 0.75;

/** Expected array output, watts, for an irradiance on the array (W/m²). */
export function expectedPvWatts(
  array: PvArrayConfig,
  irradianceWattsPerSquareMetre: number,
): number {
  if (!Number.isFinite(irradianceWattsPerSquareMetre) || irradianceWattsPerSquareMetre <= 0)
    return 0;
  return (
    (array.ratedWatts * irradianceWattsPerSquareMetre * (array.derate ?? DEFAULT_PV_DERATE)) / 1000
  );
}

/** Share of clear-sky GHI that is diffuse, for the clear-sky plane-of-array estimate. */
export const CLEAR_SKY_DIFFUSE_FRACTION = 0.15;
/** Ground reflectance for the plane-of-array estimate. */
export const DEFAULT_ALBEDO = 0.2;

/**
 * Plane-of-array irradiance from GHI for a tilted array (isotropic sky): a fixed diffuse share,
 * the rest as beam, plus ground reflection. W/m².
 */
export function planeOfArrayIrradiance(
  ghiWattsPerSquareMetre: number,
  sun: { zenithDegrees: number; azimuthDegrees: number },
  array: Pick<PvArrayConfig, 'tiltDegrees' | 'azimuthDegrees'>,
): number {
  if (!(ghiWattsPerSquareMetre > 0)) return 0;
  const rad = Math.PI / 180;
  const cosZ = Math.cos(sun.zenithDegrees * rad);
  if (cosZ <= 0.01) return 0;
  const tilt = (array.tiltDegrees ?? 0) * rad;
  const facing = (array.azimuthDegrees ?? 180) * rad;
  const diffuse = CLEAR_SKY_DIFFUSE_FRACTION * ghiWattsPerSquareMetre;
  const beamNormal = (ghiWattsPerSquareMetre - diffuse) / cosZ;
  const zenith = sun.zenithDegrees * rad;
  const cosIncidence =
    Math.cos(zenith) * Math.cos(tilt) +
    Math.sin(zenith) * Math.sin(tilt) * Math.cos(sun.azimuthDegrees * rad - facing);
  const beam = beamNormal * Math.max(cosIncidence, 0);
  const sky = (diffuse * (1 + Math.cos(tilt))) / 2;
  const ground = (ghiWattsPerSquareMetre * DEFAULT_ALBEDO * (1 - Math.cos(tilt))) / 2;
  return beam + sky + ground;
}

/** Expected output of an array under a clear sky at an instant, watts. */
export function clearSkyPvWatts(
  array: PvArrayConfig,
  epochSeconds: number,
  site: SiteLocation,
  options: SolarPositionOptions = {},
): number {
  const sun = solarPosition(epochSeconds, site, options);
  const ghi = haurwitzClearSkyGhi(sun.zenithDegrees);
  return expectedPvWatts(array, planeOfArrayIrradiance(ghi, sun, array));
}

/**
 * Expected clear-sky output of several arrays, as a function of time, computed exactly at
 * `gridSeconds` steps (default 5 minutes) and interpolated linearly between them. A rule that
 * judges hundreds of samples then runs the solar position algorithm once per grid step instead
 * of once per sample (the position is the expensive part); over five minutes the clear-sky curve
 * is so nearly straight that the difference is a few watts in thousands (see the test).
 */
export function clearSkyPvWattsOnGrid(
  arrays: readonly PvArrayConfig[],
  site: SiteLocation,
  gridSeconds = 300,
): (epochSeconds: number) => number {
  const atGrid = gridPointsFor(arrays, site, gridSeconds);
  const exact = (g: number): number => {
    let w = atGrid.get(g);
    if (w === undefined) {
      // One solar position for all the arrays: they share the site.
      const sun = solarPosition(g, site);
      const ghi = haurwitzClearSkyGhi(sun.zenithDegrees);
      w = arrays.reduce(
        (sum, a) => sum + expectedPvWatts(a, planeOfArrayIrradiance(ghi, sun, a)),
        0,
      );
      if (atGrid.size >= GRID_POINTS_PER_PLACE) atGrid.delete(atGrid.keys().next().value!);
      atGrid.set(g, w);
    }
    return w;
  };
  return (t) => {
    const g0 = Math.floor(t / gridSeconds) * gridSeconds;
    const w0 = exact(g0);
    if (t === g0) return w0;
    const w1 = exact(g0 + gridSeconds);
    return w0 + ((w1 - w0) * (t - g0)) / gridSeconds;
  };
}

/**
 * Grid points already computed, kept across calls for each set of arrays at each place: the
 * value is a pure function of those, and a busy fleet re-judges every site every few minutes
 * over nearly the same hours (re-running the solar position ~60 times a judgement was the
 * largest part of the rules' time). Bounded: the places used least recently are forgotten first,
 * and within a place the points computed longest ago (~8 h of 5-minute points are kept).
 */
const gridCache = new Map<string, Map<number, number>>();
const GRID_PLACES = 12_000;
const GRID_POINTS_PER_PLACE = 100;

function gridPointsFor(
  arrays: readonly PvArrayConfig[],
  site: SiteLocation,
  gridSeconds: number,
): Map<number, number> {
  const key = JSON.stringify([arrays, site, gridSeconds]);
  let points = gridCache.get(key);
  if (points) {
    gridCache.delete(key); // re-inserted below: Map order is the least recently used first
  } else {
    points = new Map();
    if (gridCache.size >= GRID_PLACES) gridCache.delete(gridCache.keys().next().value!);
  }
  gridCache.set(key, points);
  return points;
}
