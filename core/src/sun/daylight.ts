/**
 * Sunrise, sunset and the "overnight" window of a site, in its IANA time zone. Rise and set are
 * when the sun's geometric centre, seen from the site, is 0.8333° below the horizon (refraction
 * 0.5667° plus the sun's radius 0.26667°, as in the SPA), found by bisection on the full SPA.
 */
import { type SiteLocation, type SolarPositionOptions, solarPosition } from './solar-position.js';
import { startOfLocalDay, startOfNextLocalDay } from '../time-zone.js';
import type { TimeWindow } from '../battery/overnight.js';

/** Elevation of the sun's centre at rise and set, degrees. */
export const SUNRISE_SUNSET_ELEVATION_DEGREES = -0.8333;

/** A site with a time zone. */
export interface SiteWithTimeZone extends SiteLocation {
  /** IANA time zone, e.g. 'America/Denver'. */
  timeZone: string;
}

/** Sun events of one local day. */
export interface SunDay {
  /** Local midnight starting the day, epoch seconds. */
  dayStartT: number;
  /** Next local midnight, epoch seconds. */
  dayEndT: number;
  /** Sunrise, epoch seconds, or null when the sun does not rise that day. */
  sunriseT: number | null;
  /** Sunset, epoch seconds, or null when the sun does not set that day. */
  sunsetT: number | null;
  /** 'day' when the sun stays up all day (polar day), 'night' when it stays down, else null. */
  polar: 'day' | 'night' | null;
}

const STEP_SECONDS = 1800;

function elevationAt(t: number, site: SiteLocation, options: SolarPositionOptions): number {
  return solarPosition(t, site, options).elevationDegrees - SUNRISE_SUNSET_ELEVATION_DEGREES;
}

function bisect(
  lo: number,
  hi: number,
  fLo: number,
  site: SiteLocation,
  options: SolarPositionOptions,
): number {
  let a = lo;
  let b = hi;
  let fa = fLo;
  while (b - a > 0.5) {
    const mid = (a + b) / 2;
    const fm = elevationAt(mid, site, options);
    if (fm === 0) return mid;
    if (fa < 0 === fm < 0) {
      a = mid;
      fa = fm;
    } else b = mid;
  }
  return (a + b) / 2;
}

/**
 * Sunrise and sunset for the local day (in the site's time zone) that contains the instant.
 * Accurate to about a second against the SPA itself.
 */
export function sunDay(
  epochSeconds: number,
  site: SiteWithTimeZone,
  options: SolarPositionOptions = {},
): SunDay {
  const dayStartT = startOfLocalDay(epochSeconds, site.timeZone);
  const key = JSON.stringify([
    site.latitudeDegrees,
    site.longitudeDegrees,
    site.elevationMetres ?? 0,
    site.timeZone,
    options,
    dayStartT,
  ]);
  const known = sunDays.get(key);
  if (known) return { ...known };
  const found = computeSunDay(dayStartT, epochSeconds, site, options);
  if (sunDays.size >= SUN_DAYS_KEPT) sunDays.delete(sunDays.keys().next().value!);
  sunDays.set(key, found);
  return { ...found };
}

/**
 * Days already worked out, per place and day (a pure function of those): the rules ask for the
 * last night at every judgement of every site, and each day costs ~70 solar positions, which
 * made the night's window most of the low-charge rule's time. The oldest entries go first.
 */
const sunDays = new Map<string, SunDay>();
const SUN_DAYS_KEPT = 50_000;

function computeSunDay(
  dayStartT: number,
  epochSeconds: number,
  site: SiteWithTimeZone,
  options: SolarPositionOptions,
): SunDay {
  const dayEndT = startOfNextLocalDay(epochSeconds, site.timeZone);
  let sunriseT: number | null = null;
  let sunsetT: number | null = null;
  let previousT = dayStartT;
  let previous = elevationAt(previousT, site, options);
  const first = previous;
  let anyUp = previous > 0;
  for (let t = dayStartT + STEP_SECONDS; previousT < dayEndT; t += STEP_SECONDS) {
    const at = Math.min(t, dayEndT);
    const value = elevationAt(at, site, options);
    if (value > 0) anyUp = true;
    if (previous <= 0 && value > 0 && sunriseT === null) {
      sunriseT = bisect(previousT, at, previous, site, options);
    } else if (previous > 0 && value <= 0 && sunsetT === null) {
      sunsetT = bisect(previousT, at, previous, site, options);
    }
    previousT = at;
    previous = value;
  }
  let polar: SunDay['polar'] = null;
  if (sunriseT === null && sunsetT === null) polar = anyUp || first > 0 ? 'day' : 'night';
  return { dayStartT, dayEndT, sunriseT, sunsetT, polar };
}

/** Returns true while the sun's centre is above the rise/set elevation at the site. */
export function isDaylight(
  epochSeconds: number,
  site: SiteLocation,
  options: SolarPositionOptions = {},
): boolean {
  return elevationAt(epochSeconds, site, options) > 0;
}

/**
 * The night that contains the instant, or the last one that ended before it when it is day:
 * from a sunset to the next sunrise. Null at polar latitudes when there is no sunset or sunrise
 * within three days.
 */
export function overnightWindow(
  epochSeconds: number,
  site: SiteWithTimeZone,
  options: SolarPositionOptions = {},
): TimeWindow | null {
  const day = (t: number) => sunDay(t, site, options);
  const today = day(epochSeconds);
  const lastSunsetBefore = (t: number): number | null => {
    let d = today;
    for (let i = 0; i < 3; i += 1) {
      if (d.sunsetT !== null && d.sunsetT <= t) return d.sunsetT;
      d = day(d.dayStartT - 1);
    }
    return null;
  };
  const firstSunriseAfter = (t: number): number | null => {
    let d = day(t);
    for (let i = 0; i < 3; i += 1) {
      if (d.sunriseT !== null && d.sunriseT > t) return d.sunriseT;
      d = day(d.dayEndT + 1);
    }
    return null;
  };
  if (isDaylight(epochSeconds, site, options)) {
    // Daytime: the night that ended with this morning's sunrise.
    const sunrise =
      today.sunriseT !== null && today.sunriseT <= epochSeconds ? today.sunriseT : null;
    if (sunrise === null) return null;
    const sunset = lastSunsetBefore(sunrise);
    return sunset === null ? null : { startT: sunset, endT: sunrise };
  }
  const sunset = lastSunsetBefore(epochSeconds);
  if (sunset === null) return null;
  const sunrise = firstSunriseAfter(sunset);
  return sunrise === null ? null : { startT: sunset, endT: sunrise };
}

/**
 * The pre-dawn window: the hour (or the given span) before sunrise that ends a night, used as a
 * rest for batteries without a current sensor.
 */
export function preDawnWindow(night: TimeWindow, spanSeconds = 3600): TimeWindow {
  return { startT: Math.max(night.startT, night.endT - spanSeconds), endT: night.endT };
}
