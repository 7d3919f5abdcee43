import * as SunCalc from 'suncalc';

/**
 * The last sunrise at a place at or before an instant, epoch seconds, from suncalc's short
 * formulas (within about a minute of the full SPA in core, microseconds instead of tens of
 * milliseconds). The scheduler only needs it to know when a night has ended and is worth
 * judging; the overnight-sag rule itself works out the exact night with core's SPA, once per
 * site and day. Null when the sun neither rose nor set in the last three days (polar).
 */
export function approximateLastSunrise(
  nowT: number,
  place: { latitudeDegrees: number; longitudeDegrees: number },
): number | null {
  let latest: number | null = null;
  for (let daysBack = 0; daysBack <= 3; daysBack++) {
    const when = new Date((nowT - daysBack * 86_400) * 1000);
    const t = SunCalc.getTimes(when, place.latitudeDegrees, place.longitudeDegrees).sunrise;
    const sunriseT = t ? t.getTime() / 1000 : Number.NaN;
    if (Number.isFinite(sunriseT) && sunriseT <= nowT && (latest === null || sunriseT > latest))
      latest = sunriseT;
    if (latest !== null && daysBack >= 1) break;
  }
  return latest;
}
