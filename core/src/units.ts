/**
 * One place for units. Everything inside Wellkept is SI (m, m³, Pa, s, W, V, A; temperatures
 * in °C where the name says so); conversions happen only at the edges, for display and for
 * forms. Constants are exact definitions, not rounded figures.
 */

/** Metres in one international inch (exact, 1959 agreement). */
export const METRES_PER_INCH = 0.0254;
/** Metres in one international foot: 12 in (exact). */
export const METRES_PER_FOOT = 12 * METRES_PER_INCH;
/** Standard acceleration of gravity, m/s² (CGPM 1901, exact). */
export const STANDARD_GRAVITY_METRES_PER_SECOND_SQUARED = 9.80665;
/** Kilograms in one avoirdupois pound (exact). */
export const KILOGRAMS_PER_POUND = 0.45359237;
/** Litres in one US liquid gallon: 231 in³ (exact) = 3.785411784 L. */
export const LITRES_PER_US_GALLON = 3.785411784;
/** Cubic metres in one US liquid gallon (exact). */
export const CUBIC_METRES_PER_US_GALLON = LITRES_PER_US_GALLON / 1000;
/** Newtons in one pound-force: 0.45359237 kg × standard gravity (exact). */
export const NEWTONS_PER_POUND_FORCE =
  KILOGRAMS_PER_POUND * STANDARD_GRAVITY_METRES_PER_SECOND_SQUARED;
/** Pascals in one pound-force per square inch, ≈ 6894.757293168 Pa (exact by definition). */
export const PASCALS_PER_PSI = NEWTONS_PER_POUND_FORCE / METRES_PER_INCH ** 2;
/** Watts in one mechanical horsepower, 550 ft·lbf/s ≈ 745.69987158227 W (exact by definition). */
export const WATTS_PER_HORSEPOWER = 550 * METRES_PER_FOOT * NEWTONS_PER_POUND_FORCE;
/** Pascals in one bar (exact). */
export const PASCALS_PER_BAR = 100_000;
/** Pascals in one standard atmosphere (exact). */
export const STANDARD_ATMOSPHERE_PASCALS = 101_325;
/** Density of fresh water used for hydraulics, kg/m³ (trade convention). */
export const WATER_DENSITY_KILOGRAMS_PER_CUBIC_METRE = 1000;
/** Seconds in a minute. */
export const SECONDS_PER_MINUTE = 60;
/** Seconds in an hour. */
export const SECONDS_PER_HOUR = 3600;
/** Seconds in a day (civil days may be 23 or 25 h at DST changes; see time-zone.ts). */
export const SECONDS_PER_DAY = 86_400;

/** Converts US gallons to cubic metres. */
export function usGallonsToCubicMetres(gallons: number): number {
  return gallons * CUBIC_METRES_PER_US_GALLON;
}
/** Converts cubic metres to US gallons. */
export function cubicMetresToUsGallons(cubicMetres: number): number {
  return cubicMetres / CUBIC_METRES_PER_US_GALLON;
}
/** Converts litres to cubic metres. */
export function litresToCubicMetres(litres: number): number {
  return litres / 1000;
}
/** Converts cubic metres to litres. */
export function cubicMetresToLitres(cubicMetres: number): number {
  return cubicMetres * 1000;
}
/** Converts cubic feet to cubic metres. */
export function cubicFeetToCubicMetres(cubicFeet: number): number {
  return cubicFeet * METRES_PER_FOOT ** 3;
}
/** Converts cubic metres to cubic feet. */
export function cubicMetresToCubicFeet(cubicMetres: number): number {
  return cubicMetres / METRES_PER_FOOT ** 3;
}
/** Converts feet to metres. */
export function feetToMetres(feet: number): number {
  return feet * METRES_PER_FOOT;
}
/** Converts metres to feet. */
export function metresToFeet(metres: number): number {
  return metres / METRES_PER_FOOT;
}
/** Converts inches to metres. */
export function inchesToMetres(inches: number): number {
  return inches * METRES_PER_INCH;
}
/** Converts metres to inches. */
export function metresToInches(metres: number): number {
  return metres / METRES_PER_INCH;
}
/** Converts psi to pascals. */
export function psiToPascals(psi: number): number {
  return psi * PASCALS_PER_PSI;
}
/** Converts pascals to psi. */
export function pascalsToPsi(pascals: number): number {
  return pascals / PASCALS_PER_PSI;
}
/** Converts bar to pascals. */
export function barToPascals(bar: number): number {
  return bar * PASCALS_PER_BAR;
}
/** Converts pascals to bar. */
export function pascalsToBar(pascals: number): number {
  return pascals / PASCALS_PER_BAR;
}
/** Converts US gallons per minute to cubic metres per second. */
export function usGallonsPerMinuteToCubicMetresPerSecond(gpm: number): number {
  return (gpm * CUBIC_METRES_PER_US_GALLON) / SECONDS_PER_MINUTE;
}
/** Converts cubic metres per second to US gallons per minute. */
export function cubicMetresPerSecondToUsGallonsPerMinute(cubicMetresPerSecond: number): number {
  return (cubicMetresPerSecond * SECONDS_PER_MINUTE) / CUBIC_METRES_PER_US_GALLON;
}
/** Converts litres per minute to cubic metres per second. */
export function litresPerMinuteToCubicMetresPerSecond(litresPerMinute: number): number {
  return litresPerMinute / 1000 / SECONDS_PER_MINUTE;
}
/** Converts cubic metres per second to litres per minute. */
export function cubicMetresPerSecondToLitresPerMinute(cubicMetresPerSecond: number): number {
  return cubicMetresPerSecond * 1000 * SECONDS_PER_MINUTE;
}
/** Converts degrees Celsius to degrees Fahrenheit. */
export function celsiusToFahrenheit(celsius: number): number {
  return (celsius * 9) / 5 + 32;
}
/** Converts degrees Fahrenheit to degrees Celsius. */
export function fahrenheitToCelsius(fahrenheit: number): number {
  return ((fahrenheit - 32) * 5) / 9;
}
/** Converts mechanical horsepower to watts. */
export function horsepowerToWatts(horsepower: number): number {
  return horsepower * WATTS_PER_HORSEPOWER;
}
/** Converts watts to mechanical horsepower. */
export function wattsToHorsepower(watts: number): number {
  return watts / WATTS_PER_HORSEPOWER;
}

// ---------------------------------------------------------------------------------------------
// Display

/** A person's choice of units: US customary (gal, ft, psi, gpm, °F) or metric (L, m, kPa, L/min, °C). */
export type UnitSystem = 'us' | 'metric';

/** Every unit system, for forms and validation. */
export const UNIT_SYSTEMS: readonly UnitSystem[] = ['us', 'metric'];

/** Returns true when `value` names a unit system. */
export function isUnitSystem(value: unknown): value is UnitSystem {
  return value === 'us' || value === 'metric';
}

/**
 * A quantity ready to show: the number in display units (null when the input was not a finite
 * number), the unit symbol, and the text to print ("1,250 gal", "—" when unknown).
 */
export interface DisplayQuantity {
  value: number | null;
  unit: string;
  text: string;
}

/** Options shared by the formatters. */
export interface FormatOptions {
  /** Fraction digits to show; the default depends on the size of the number. */
  fractionDigits?: number;
  /** BCP 47 locale for digit grouping; default 'en-US'. */
  locale?: string;
}

/** The text shown for a quantity that is not known (NaN, Infinity, missing). */
export const UNKNOWN_QUANTITY_TEXT = '—';

function defaultFractionDigits(value: number): number {
  const magnitude = Math.abs(value);
  if (magnitude >= 100) return 0;
  if (magnitude >= 10) return 1;
  return 2;
}

/**
 * Rounds and formats a number already in display units, with its unit symbol.
 * Non-finite input gives `{ value: null, text: '—' }`.
 */
export function formatQuantity(
  value: number,
  unit: string,
  options: FormatOptions = {},
): DisplayQuantity {
  if (!Number.isFinite(value)) return { value: null, unit, text: UNKNOWN_QUANTITY_TEXT };
  const digits = options.fractionDigits ?? defaultFractionDigits(value);
  const factor = 10 ** digits;
  let rounded = Math.round(value * factor) / factor;
  if (Object.is(rounded, -0)) rounded = 0;
  const number = new Intl.NumberFormat(options.locale ?? 'en-US', {
    minimumFractionDigits: digits,
    maximumFractionDigits: digits,
  }).format(rounded);
  const separator = unit === '%' || unit.startsWith('°') ? '' : '\u00a0';
  return { value: rounded, unit, text: `${number}${separator}${unit}` };
}

/** Formats a volume given in cubic metres: gallons (us) or litres (metric). */
export function formatVolume(
  cubicMetres: number,
  system: UnitSystem,
  options?: FormatOptions,
): DisplayQuantity {
  return system === 'us'
    ? formatQuantity(cubicMetresToUsGallons(cubicMetres), 'gal', options)
    : formatQuantity(cubicMetresToLitres(cubicMetres), 'L', options);
}

/** Formats a length or depth given in metres: feet (us) or metres (metric). */
export function formatLength(
  metres: number,
  system: UnitSystem,
  options?: FormatOptions,
): DisplayQuantity {
  return system === 'us'
    ? formatQuantity(metresToFeet(metres), 'ft', options)
    : formatQuantity(metres, 'm', options);
}

/**
 * Formats a (gauge) pressure given in pascals: psi (us) or kPa (metric); pass `metricUnit: 'bar'`
 * for bar.
 */
export function formatPressure(
  pascals: number,
  system: UnitSystem,
  options: FormatOptions & { metricUnit?: 'kPa' | 'bar' } = {},
): DisplayQuantity {
  if (system === 'us') return formatQuantity(pascalsToPsi(pascals), 'psi', options);
  return options.metricUnit === 'bar'
    ? formatQuantity(pascalsToBar(pascals), 'bar', options)
    : formatQuantity(pascals / 1000, 'kPa', options);
}

/** Formats a flow rate given in cubic metres per second: gpm (us) or L/min (metric). */
export function formatFlowRate(
  cubicMetresPerSecond: number,
  system: UnitSystem,
  options?: FormatOptions,
): DisplayQuantity {
  return system === 'us'
    ? formatQuantity(cubicMetresPerSecondToUsGallonsPerMinute(cubicMetresPerSecond), 'gpm', options)
    : formatQuantity(cubicMetresPerSecondToLitresPerMinute(cubicMetresPerSecond), 'L/min', options);
}

/** Formats a temperature given in °C: °F (us) or °C (metric). */
export function formatTemperature(
  celsius: number,
  system: UnitSystem,
  options: FormatOptions = {},
): DisplayQuantity {
  const opts = { fractionDigits: 0, ...options };
  return system === 'us'
    ? formatQuantity(celsiusToFahrenheit(celsius), '°F', opts)
    : formatQuantity(celsius, '°C', opts);
}

/** Formats a voltage in volts (the same in both systems). */
export function formatVolts(volts: number, options: FormatOptions = {}): DisplayQuantity {
  return formatQuantity(volts, 'V', { fractionDigits: 2, ...options });
}

/** Formats a current in amperes (the same in both systems). */
export function formatAmps(amps: number, options: FormatOptions = {}): DisplayQuantity {
  return formatQuantity(amps, 'A', { fractionDigits: 1, ...options });
}

/** Formats a power in watts, switching to kW at 10 kW (the same in both systems). */
export function formatWatts(watts: number, options: FormatOptions = {}): DisplayQuantity {
  return Math.abs(watts) >= 10_000
    ? formatQuantity(watts / 1000, 'kW', { fractionDigits: 1, ...options })
    : formatQuantity(watts, 'W', { fractionDigits: 0, ...options });
}

/** Formats a fraction (0–1) as a percentage. */
export function formatFractionAsPercent(
  fraction: number,
  options: FormatOptions = {},
): DisplayQuantity {
  return formatQuantity(fraction * 100, '%', { fractionDigits: 0, ...options });
}

/**
 * Formats a duration in seconds as plain words: "45 s", "12 min", "3 h 20 min", "2 d 4 h".
 * Non-finite or negative input gives "—".
 */
export function formatDurationSeconds(seconds: number): string {
  if (!Number.isFinite(seconds) || seconds < 0) return UNKNOWN_QUANTITY_TEXT;
  if (seconds < 60) return `${Math.round(seconds)} s`;
  const minutes = Math.round(seconds / 60);
  if (minutes < 60) return `${minutes} min`;
  const hours = Math.floor(minutes / 60);
  if (hours < 48) {
    const rest = minutes - hours * 60;
    return rest === 0 ? `${hours} h` : `${hours} h ${rest} min`;
  }
  const days = Math.floor(hours / 24);
  const restHours = hours - days * 24;
  return restHours === 0 ? `${days} d` : `${days} d ${restHours} h`;
}

/** Parses a volume typed in display units back to cubic metres. */
export function volumeToCubicMetres(value: number, system: UnitSystem): number {
  return system === 'us' ? usGallonsToCubicMetres(value) : litresToCubicMetres(value);
}
/** Parses a length typed in display units (ft or m) back to metres. */
export function lengthToMetres(value: number, system: UnitSystem): number {
  return system === 'us' ? feetToMetres(value) : value;
}
/** Parses a pressure typed in display units (psi or kPa) back to pascals. */
export function pressureToPascals(value: number, system: UnitSystem): number {
  return system === 'us' ? psiToPascals(value) : value * 1000;
}
/** Parses a flow rate typed in display units (gpm or L/min) back to m³/s. */
export function flowRateToCubicMetresPerSecond(value: number, system: UnitSystem): number {
  return system === 'us'
    ? usGallonsPerMinuteToCubicMetresPerSecond(value)
    : litresPerMinuteToCubicMetresPerSecond(value);
}
/** Parses a temperature typed in display units (°F or °C) back to °C. */
export function temperatureToCelsius(value: number, system: UnitSystem): number {
  return system === 'us' ? fahrenheitToCelsius(value) : value;
}
