import { describe, expect, it } from 'vitest';
import { sunDay } from '../../src/index.js';

// Our own check (no published value): days are kept once worked out, so a second place or a
// second day must never be answered from the first one's entry.
const MESA = {
  latitudeDegrees: 35.4,
  longitudeDegrees: -107.9,
  elevationMetres: 2000,
  timeZone: 'America/Denver',
};
const COAST = { latitudeDegrees: -31.9, longitudeDegrees: 115.9, timeZone: 'Australia/Perth' };
const JUNE = Date.UTC(2026, 5, 21, 18) / 1000;

describe('sun days kept across calls', () => {
  it('answers a repeat with the same day, and each place and day with its own', () => {
    const first = sunDay(JUNE, MESA);
    const coast = sunDay(JUNE, COAST);
    const nextDay = sunDay(JUNE + 86_400, MESA);
    const again = sunDay(JUNE + 60, MESA); // same local day, a minute later
    expect(again).toEqual(first);
    expect(coast.sunriseT).not.toBe(first.sunriseT);
    expect(nextDay.dayStartT).toBe(first.dayEndT);
    expect(nextDay.sunriseT! - first.sunriseT!).toBeGreaterThan(86_300);
    // Mid-June in the high desert: sunrise before sunset, about 14.5 hours apart.
    expect((first.sunsetT! - first.sunriseT!) / 3600).toBeCloseTo(14.5, 0);
  });

  it('hands out copies: a caller changing its answer does not change the next one', () => {
    const day = sunDay(JUNE, MESA);
    const sunrise = day.sunriseT;
    day.sunriseT = 0;
    expect(sunDay(JUNE, MESA).sunriseT).toBe(sunrise);
  });

  it('keys on the time zone too: the same place in another zone has other day bounds', () => {
    const utc = sunDay(JUNE, { ...MESA, timeZone: 'UTC' });
    const denver = sunDay(JUNE, MESA);
    expect(utc.dayStartT).not.toBe(denver.dayStartT);
  });
});
