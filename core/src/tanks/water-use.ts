/**
 * Water use from tank level history, and days of water left. A level series shows draw (the
 * level falls) and filling (it rises); noise on the sensor is ignored below a dead band so that
 * it does not add up to phantom use.
 */
import { type Sample, sortSamples } from '../series.js';
import { localDateString, startOfLocalDay, startOfNextLocalDay } from '../time-zone.js';
import { type TankConfig, tankVolumeFromLevel, tankGeometryProblem } from './tank-volume.js';

/** Water drawn and added over a window. */
export interface WaterUseResult {
  /** Water drawn from the tank, m³ (≥ 0). */
  usedCubicMetres: number;
  /** Water added to the tank, m³ (≥ 0). */
  filledCubicMetres: number;
  /** First and last sample times used, epoch seconds (null when fewer than two samples). */
  fromT: number | null;
  toT: number | null;
  /** Number of level samples that were usable. */
  samplesUsed: number;
}

/** Options for {@link waterUseFromLevels}. */
export interface WaterUseOptions {
  /** Changes in level smaller than this are sensor noise, metres. Default 0.01 m. */
  deadBandMetres?: number;
  /**
   * Water known to have entered the tank over the window (e.g. from pump runs), m³. When given,
   * use = inflow − net rise (a water balance) instead of the sum of the falls.
   */
  inflowCubicMetres?: number;
}

/** Default dead band for level noise, metres. */
export const DEFAULT_LEVEL_DEAD_BAND_METRES = 0.01;

/**
 * Water drawn and added, from a level series (metres, any order; unusable readings skipped).
 * Without a known inflow, use is the sum of the falls larger than the dead band, so water drawn
 * while a pump is filling is missed; with `inflowCubicMetres` the balance inflow − net rise is
 * used instead.
 */
export function waterUseFromLevels(
  tank: TankConfig,
  levels: readonly Sample[],
  options: WaterUseOptions = {},
): WaterUseResult {
  const empty: WaterUseResult = {
    usedCubicMetres: 0,
    filledCubicMetres: 0,
    fromT: null,
    toT: null,
    samplesUsed: 0,
  };
  if (tankGeometryProblem(tank.geometry)) return empty;
  const points: { t: number; depth: number; volume: number }[] = [];
  for (const s of sortSamples(levels)) {
    if (!Number.isFinite(s.t)) continue;
    const r = tankVolumeFromLevel(tank, s.v);
    if (r.ok) points.push({ t: s.t, depth: r.depthMetres, volume: r.cubicMetres });
  }
  const first = points[0];
  const last = points[points.length - 1];
  if (!first || !last || points.length < 2) return { ...empty, samplesUsed: points.length };
  const deadBand = Math.max(options.deadBandMetres ?? DEFAULT_LEVEL_DEAD_BAND_METRES, 0);
  let used = 0;
  let filled = 0;
  let reference = first;
  for (const p of points) {
    if (Math.abs(p.depth - reference.depth) <= deadBand) continue;
    const change = p.volume - reference.volume;
    if (change < 0) used -= change;
    else filled += change;
    reference = p;
  }
  const tail = last.volume - reference.volume;
  if (tail < 0) used -= tail;
  else filled += tail;
  if (options.inflowCubicMetres !== undefined && Number.isFinite(options.inflowCubicMetres)) {
    const netRise = last.volume - first.volume;
    const inflow = Math.max(options.inflowCubicMetres, 0);
    used = Math.max(inflow - netRise, 0);
    filled = inflow;
  }
  return {
    usedCubicMetres: used,
    filledCubicMetres: filled,
    fromT: first.t,
    toT: last.t,
    samplesUsed: points.length,
  };
}

/** Water use on one local calendar day. */
export interface DailyWaterUse {
  /** Local date 'YYYY-MM-DD' in the site's time zone. */
  date: string;
  usedCubicMetres: number;
  filledCubicMetres: number;
  /** True when samples cover the day from within an hour of its start to within an hour of its end. */
  complete: boolean;
}

/**
 * Water use per local day (site time zone) from a level series. Each day is measured from the
 * last sample before it to its last sample, so nothing falls between days.
 */
export function dailyWaterUse(
  tank: TankConfig,
  levels: readonly Sample[],
  timeZone: string,
  options: Omit<WaterUseOptions, 'inflowCubicMetres'> = {},
): DailyWaterUse[] {
  const sorted = sortSamples(levels).filter((s) => Number.isFinite(s.t) && Number.isFinite(s.v));
  const first = sorted[0];
  const last = sorted[sorted.length - 1];
  if (!first || !last) return [];
  const days: DailyWaterUse[] = [];
  let dayStart = startOfLocalDay(first.t, timeZone);
  let index = 0;
  for (let guard = 0; guard < 3660 && dayStart <= last.t; guard += 1) {
    const dayEnd = startOfNextLocalDay(dayStart, timeZone);
    const inDay: Sample[] = [];
    const previous = index > 0 ? sorted[index - 1] : undefined;
    if (previous) inDay.push(previous);
    while (index < sorted.length && (sorted[index] as Sample).t < dayEnd) {
      inDay.push(sorted[index] as Sample);
      index += 1;
    }
    const use = waterUseFromLevels(tank, inDay, options);
    days.push({
      date: localDateString(dayStart, timeZone),
      usedCubicMetres: use.usedCubicMetres,
      filledCubicMetres: use.filledCubicMetres,
      complete:
        use.fromT !== null &&
        use.toT !== null &&
        use.fromT <= dayStart + 3600 &&
        use.toT >= dayEnd - 3600,
    });
    dayStart = dayEnd;
  }
  return days;
}

/**
 * Days until the tank reaches its reserve at the given daily use: (water − reserve) / use per
 * day. Null when use is not a positive finite number (no forecast: the water is not going
 * down); 0 when already at or below the reserve.
 */
export function daysOfWaterLeft(
  cubicMetresInStorage: number,
  usePerDayCubicMetres: number,
  reserveCubicMetres = 0,
): number | null {
  if (!Number.isFinite(cubicMetresInStorage) || !Number.isFinite(reserveCubicMetres)) return null;
  if (!Number.isFinite(usePerDayCubicMetres) || usePerDayCubicMetres <= 1e-9) return null;
  return Math.max(cubicMetresInStorage - reserveCubicMetres, 0) / usePerDayCubicMetres;
}
