/**
 * Sun position by the full Solar Position Algorithm (Reda & Andreas, NREL/TP-560-34302, 2004,
 * rev. 2008): Earth's heliocentric position from the periodic terms, nutation, aberration,
 * apparent sidereal time, topocentric parallax and atmospheric refraction. Stated uncertainty
 * ±0.0003° for the years −2000 to 6000. Angles in degrees, times in epoch seconds (UTC).
 */
import {
  SPA_LATITUDE_TERMS,
  SPA_LONGITUDE_TERMS,
  SPA_NUTATION_ARGUMENTS,
  SPA_NUTATION_COEFFICIENTS,
  SPA_RADIUS_TERMS,
} from './spa-terms.js';

/** Where the observer stands. */
export interface SiteLocation {
  /** Degrees north (negative south). */
  latitudeDegrees: number;
  /** Degrees east (negative west). */
  longitudeDegrees: number;
  /** Height above sea level, metres. Default 0. */
  elevationMetres?: number;
}

/** Weather and clock settings for the position. */
export interface SolarPositionOptions {
  /** Mean annual local pressure, millibars (hPa), for refraction. Default from elevation. */
  pressureMillibars?: number;
  /** Mean annual local temperature, °C, for refraction. Default 12. */
  temperatureCelsius?: number;
  /** TT − UT, seconds. Default 69 (about its value in the 2020s). */
  deltaTSeconds?: number;
}

/** The sun as seen from the site. */
export interface SolarPosition {
  /** Topocentric zenith angle with refraction, degrees. */
  zenithDegrees: number;
  /** Topocentric elevation with refraction (apparent), degrees. */
  apparentElevationDegrees: number;
  /** Topocentric elevation without refraction (geometric), degrees. */
  elevationDegrees: number;
  /** Azimuth from north, eastward, 0–360 degrees. */
  azimuthDegrees: number;
  /** Geocentric declination, degrees. */
  declinationDegrees: number;
  /** Earth–sun distance, astronomical units. */
  earthSunDistanceAu: number;
}

const RAD = Math.PI / 180;
const DEG = 180 / Math.PI;

function limitDegrees(x: number): number {
  const r = x % 360;
  return r < 0 ? r + 360 : r;
}

function seriesSum(terms: readonly (readonly [number, number, number])[], jme: number): number {
  let sum = 0;
  for (const [a, b, c] of terms) sum += a * Math.cos(b + c * jme);
  return sum;
}

function earthValue(
  series: readonly (readonly (readonly [number, number, number])[])[],
  jme: number,
): number {
  let total = 0;
  let power = 1;
  for (const terms of series) {
    total += seriesSum(terms, jme) * power;
    power *= jme;
  }
  return total / 1e8;
}

/** Standard pressure at an elevation (barometric formula), millibars. */
export function standardPressureMillibars(elevationMetres: number): number {
  return 1013.25 * (1 - 2.25577e-5 * elevationMetres) ** 5.25588;
}

/**
 * Solar position at an instant for a site, by the full SPA. The atmospheric refraction
 * correction applies only while the sun is above −0.8333° (the SPA's sunrise/sunset elevation).
 */
export function solarPosition(
  epochSeconds: number,
  site: SiteLocation,
  options: SolarPositionOptions = {},
): SolarPosition {
  const elevationMetres = site.elevationMetres ?? 0;
  const pressure = options.pressureMillibars ?? standardPressureMillibars(elevationMetres);
  const temperature = options.temperatureCelsius ?? 12;
  const deltaT = options.deltaTSeconds ?? 69;

  const jd = epochSeconds / 86400 + 2440587.5;
  const jde = jd + deltaT / 86400;
  const jc = (jd - 2451545) / 36525;
  const jce = (jde - 2451545) / 36525;
  const jme = jce / 10;

  // Earth heliocentric position → geocentric sun.
  const l = limitDegrees(earthValue(SPA_LONGITUDE_TERMS, jme) * DEG);
  const b = earthValue(SPA_LATITUDE_TERMS, jme) * DEG;
  const r = earthValue(SPA_RADIUS_TERMS, jme);
  const theta = limitDegrees(l + 180);
  const beta = -b;

  // Nutation in longitude and obliquity.
  const x = [
    297.85036 + 445267.11148 * jce - 0.0019142 * jce ** 2 + jce ** 3 / 189474,
    357.52772 + 35999.05034 * jce - 0.0001603 * jce ** 2 - jce ** 3 / 300000,
    134.96298 + 477198.867398 * jce + 0.0086972 * jce ** 2 + jce ** 3 / 56250,
    93.27191 + 483202.017538 * jce - 0.0036825 * jce ** 2 + jce ** 3 / 327270,
    125.04452 - 1934.136261 * jce + 0.0020708 * jce ** 2 + jce ** 3 / 450000,
  ];
  let deltaPsi = 0;
  let deltaEpsilon = 0;
  for (let i = 0; i < SPA_NUTATION_COEFFICIENTS.length; i += 1) {
    const [a, bb, c, d] = SPA_NUTATION_COEFFICIENTS[i] as readonly [number, number, number, number];
    const y = SPA_NUTATION_ARGUMENTS[i] as readonly number[];
    let argument = 0;
    for (let j = 0; j < 5; j += 1) argument += (x[j] as number) * (y[j] as number);
    deltaPsi += (a + bb * jce) * Math.sin(argument * RAD);
    deltaEpsilon += (c + d * jce) * Math.cos(argument * RAD);
  }
  deltaPsi /= 36_000_000;
  deltaEpsilon /= 36_000_000;

  // True obliquity of the ecliptic.
  const u = jme / 10;
  const epsilon0 =
    84381.448 +
    u *
      (-4680.93 +
        u *
          (-1.55 +
            u *
              (1999.25 +
                u *
                  (-51.38 +
                    u *
                      (-249.67 +
                        u * (-39.05 + u * (7.12 + u * (27.87 + u * (5.79 + u * 2.45)))))))));
  const epsilon = epsilon0 / 3600 + deltaEpsilon;

  // Aberration and apparent sun longitude.
  const deltaTau = -20.4898 / (3600 * r);
  const lambda = theta + deltaPsi + deltaTau;

  // Apparent sidereal time at Greenwich.
  const nu0 = limitDegrees(
    280.46061837 + 360.98564736629 * (jd - 2451545) + 0.000387933 * jc ** 2 - jc ** 3 / 38710000,
  );
  const nu = nu0 + deltaPsi * Math.cos(epsilon * RAD);

  // Geocentric right ascension and declination.
  const lambdaRad = lambda * RAD;
  const epsilonRad = epsilon * RAD;
  const betaRad = beta * RAD;
  const alpha = limitDegrees(
    Math.atan2(
      Math.sin(lambdaRad) * Math.cos(epsilonRad) - Math.tan(betaRad) * Math.sin(epsilonRad),
      Math.cos(lambdaRad),
    ) * DEG,
  );
  const delta =
    Math.asin(
      Math.sin(betaRad) * Math.cos(epsilonRad) +
        Math.cos(betaRad) * Math.sin(epsilonRad) * Math.sin(lambdaRad),
    ) * DEG;

  // Local hour angle.
  const h = limitDegrees(nu + site.longitudeDegrees - alpha);

  // Topocentric parallax.
  const phi = site.latitudeDegrees * RAD;
  const xi = (8.794 / (3600 * r)) * RAD;
  const uu = Math.atan(0.99664719 * Math.tan(phi));
  const xx = Math.cos(uu) + (elevationMetres / 6378140) * Math.cos(phi);
  const yy = 0.99664719 * Math.sin(uu) + (elevationMetres / 6378140) * Math.sin(phi);
  const hRad = h * RAD;
  const deltaRad = delta * RAD;
  const deltaAlpha = Math.atan2(
    -xx * Math.sin(xi) * Math.sin(hRad),
    Math.cos(deltaRad) - xx * Math.sin(xi) * Math.cos(hRad),
  );
  const deltaPrime = Math.atan2(
    (Math.sin(deltaRad) - yy * Math.sin(xi)) * Math.cos(deltaAlpha),
    Math.cos(deltaRad) - xx * Math.sin(xi) * Math.cos(hRad),
  );
  const hPrime = hRad - deltaAlpha;

  // Topocentric elevation, refraction, zenith and azimuth.
  const e0 =
    Math.asin(
      Math.sin(phi) * Math.sin(deltaPrime) +
        Math.cos(phi) * Math.cos(deltaPrime) * Math.cos(hPrime),
    ) * DEG;
  const refraction =
    e0 >= -(0.26667 + 0.5667)
      ? (pressure / 1010) *
        (283 / (273 + temperature)) *
        (1.02 / (60 * Math.tan((e0 + 10.3 / (e0 + 5.11)) * RAD)))
      : 0;
  const e = e0 + refraction;
  const gamma = limitDegrees(
    Math.atan2(
      Math.sin(hPrime),
      Math.cos(hPrime) * Math.sin(phi) - Math.tan(deltaPrime) * Math.cos(phi),
    ) * DEG,
  );
  return {
    zenithDegrees: 90 - e,
    apparentElevationDegrees: e,
    elevationDegrees: e0,
    azimuthDegrees: limitDegrees(gamma + 180),
    declinationDegrees: delta,
    earthSunDistanceAu: r,
  };
}
