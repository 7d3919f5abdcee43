import { describe, expect, it } from 'vitest';
import { unit } from 'mathjs';
import {
  CUBIC_METRES_PER_US_GALLON,
  LITRES_PER_US_GALLON,
  METRES_PER_FOOT,
  METRES_PER_INCH,
  PASCALS_PER_PSI,
  STANDARD_GRAVITY_METRES_PER_SECOND_SQUARED,
  WATTS_PER_HORSEPOWER,
  celsiusToFahrenheit,
  cubicFeetToCubicMetres,
  cubicMetresPerSecondToLitresPerMinute,
  cubicMetresPerSecondToUsGallonsPerMinute,
  cubicMetresToUsGallons,
  fahrenheitToCelsius,
  feetToMetres,
  flowRateToCubicMetresPerSecond,
  formatDurationSeconds,
  formatFlowRate,
  formatLength,
  formatPressure,
  formatTemperature,
  formatVolume,
  horsepowerToWatts,
  lengthToMetres,
  metresToFeet,
  pascalsToPsi,
  pressureToPascals,
  psiToPascals,
  temperatureToCelsius,
  usGallonsPerMinuteToCubicMetresPerSecond,
  usGallonsToCubicMetres,
  volumeToCubicMetres,
  wattsToHorsepower,
} from '../src/index.js';

const relative = (actual: number, expected: number) => Math.abs(actual / expected - 1);

describe('exact unit constants', () => {
  it('US gallon is 231 in³ with 1 in = 25.4 mm: 3.785411784 L', () => {
    // source: NIST Handbook 44, Appendix C (published); tolerance: exact
    expect(LITRES_PER_US_GALLON).toBe(3.785411784);
    expect(METRES_PER_INCH).toBe(0.0254);
    // 231 in³ computed from the inch must give the same gallon (to floating-point rounding)
    expect((231 * (METRES_PER_INCH * 1000) ** 3) / 1_000_000).toBeCloseTo(3.785411784, 12);
    expect(CUBIC_METRES_PER_US_GALLON).toBeCloseTo(0.003785411784, 15);
  });

  it('cubic foot is 1728/231 = 7.480519 gal', () => {
    // source: derived; tolerance: 1e-6
    expect(Math.abs(cubicMetresToUsGallons(cubicFeetToCubicMetres(1)) - 7.480519)).toBeLessThan(
      1e-6,
    );
  });

  it('psi and hp agree with the mathjs unit library', () => {
    // source: mathjs unit library (cross-check library on npm); tolerance: 1e-6 relative
    expect(relative(PASCALS_PER_PSI, unit(1, 'psi').toNumber('Pa'))).toBeLessThan(1e-6);
    expect(relative(WATTS_PER_HORSEPOWER, unit(1, 'hp').toNumber('W'))).toBeLessThan(1e-6);
    // published round figures: 1 psi = 6894.757 Pa, 1 hp = 745.6999 W
    expect(relative(PASCALS_PER_PSI, 6894.757)).toBeLessThan(1e-6);
    expect(relative(WATTS_PER_HORSEPOWER, 745.6999)).toBeLessThan(1e-6);
    // and the exact definitions the brief lists
    expect(PASCALS_PER_PSI).toBeCloseTo(6894.757293168, 9);
    expect(WATTS_PER_HORSEPOWER).toBeCloseTo(745.69987158227, 9);
  });

  it('standard gravity is 9.80665 m/s² (CGPM)', () => {
    expect(STANDARD_GRAVITY_METRES_PER_SECOND_SQUARED).toBe(9.80665);
  });
});

describe('conversions cross-checked against mathjs', () => {
  const cases: [string, number, (x: number) => number, string, string][] = [
    ['gallons to m³', 1250, usGallonsToCubicMetres, 'gal', 'm^3'],
    ['feet to metres', 327, feetToMetres, 'ft', 'm'],
    ['metres to feet', 12.5, metresToFeet, 'm', 'ft'],
    ['psi to Pa', 42, psiToPascals, 'psi', 'Pa'],
    ['Pa to psi', 310_000, pascalsToPsi, 'Pa', 'psi'],
    ['hp to W', 0.75, horsepowerToWatts, 'hp', 'W'],
    ['W to hp', 560, wattsToHorsepower, 'W', 'hp'],
    ['gpm to m³/s', 12, usGallonsPerMinuteToCubicMetresPerSecond, 'gal/minute', 'm^3/s'],
    ['m³/s to gpm', 0.0008, cubicMetresPerSecondToUsGallonsPerMinute, 'm^3/s', 'gal/minute'],
    ['m³/s to L/min', 0.0008, cubicMetresPerSecondToLitresPerMinute, 'm^3/s', 'L/minute'],
    ['°C to °F', 37, celsiusToFahrenheit, 'degC', 'degF'],
    ['°F to °C', -4, fahrenheitToCelsius, 'degF', 'degC'],
  ];
  for (const [label, x, convert, from, to] of cases) {
    it(label, () => {
      // source: mathjs unit library (cross-check library on npm); tolerance: 1e-6 relative
      expect(relative(convert(x), unit(x, from).toNumber(to))).toBeLessThan(1e-6);
    });
  }

  it('display inputs parse back to SI', () => {
    expect(volumeToCubicMetres(100, 'us')).toBeCloseTo(0.3785411784, 12);
    expect(volumeToCubicMetres(500, 'metric')).toBeCloseTo(0.5, 12);
    expect(lengthToMetres(10, 'us')).toBeCloseTo(3.048, 12);
    expect(pressureToPascals(40, 'us')).toBeCloseTo(275_790.29, 1);
    expect(pressureToPascals(280, 'metric')).toBe(280_000);
    expect(flowRateToCubicMetresPerSecond(60, 'metric')).toBeCloseTo(0.001, 12);
    expect(temperatureToCelsius(212, 'us')).toBeCloseTo(100, 12);
    expect(METRES_PER_FOOT).toBeCloseTo(0.3048, 15);
  });
});

describe('display formatting', () => {
  it('formats volumes for both systems', () => {
    const us = formatVolume(usGallonsToCubicMetres(1250), 'us');
    expect(us.unit).toBe('gal');
    expect(us.value).toBe(1250);
    expect(us.text).toBe('1,250\u00a0gal');
    const metric = formatVolume(1.5, 'metric');
    expect(metric).toEqual({ value: 1500, unit: 'L', text: '1,500\u00a0L' });
  });

  it('formats length, pressure, flow and temperature', () => {
    expect(formatLength(30.48, 'us').text).toBe('100\u00a0ft');
    expect(formatLength(2.345, 'metric').text).toBe('2.35\u00a0m');
    expect(formatPressure(psiToPascals(50), 'us').text).toBe('50.0\u00a0psi');
    expect(formatPressure(345_000, 'metric').text).toBe('345\u00a0kPa');
    expect(formatPressure(345_000, 'metric', { metricUnit: 'bar' }).text).toBe('3.45\u00a0bar');
    expect(formatFlowRate(usGallonsPerMinuteToCubicMetresPerSecond(8), 'us').text).toBe(
      '8.00\u00a0gpm',
    );
    expect(formatFlowRate(0.0005, 'metric').text).toBe('30.0\u00a0L/min');
    expect(formatTemperature(25, 'us').text).toBe('77°F');
    expect(formatTemperature(-3.4, 'metric').text).toBe('-3°C');
  });

  it('never shows NaN: unknown quantities print as a dash', () => {
    for (const bad of [Number.NaN, Number.POSITIVE_INFINITY]) {
      const shown = formatVolume(bad, 'us');
      expect(shown.value).toBeNull();
      expect(shown.text).toBe('—');
    }
  });

  it('formats durations in plain words', () => {
    expect(formatDurationSeconds(42)).toBe('42 s');
    expect(formatDurationSeconds(600)).toBe('10 min');
    expect(formatDurationSeconds(3 * 3600 + 20 * 60)).toBe('3 h 20 min');
    expect(formatDurationSeconds(52 * 3600)).toBe('2 d 4 h');
    expect(formatDurationSeconds(Number.NaN)).toBe('—');
  });
});
