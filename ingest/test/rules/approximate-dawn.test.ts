import { sunDay } from '@wellkept/core';
import { describe, expect, it } from 'vitest';
import { approximateLastSunrise } from '../../src/rules/approximate-dawn.js';

// The scheduler's quick sunrise against core's SPA (checked there against the NREL report).
const PLACES = [
  { latitudeDegrees: 35.4, longitudeDegrees: -107.9, timeZone: 'America/Denver' },
  { latitudeDegrees: -31.9, longitudeDegrees: 115.9, timeZone: 'Australia/Perth' },
  { latitudeDegrees: 60.2, longitudeDegrees: 24.9, timeZone: 'Europe/Helsinki' },
];
const NOONS = [Date.UTC(2026, 2, 20, 12), Date.UTC(2026, 5, 21, 12), Date.UTC(2026, 11, 2, 12)];

describe('approximate last sunrise', () => {
  it('is within two minutes of the SPA sunrise, and at or before the instant asked', () => {
    for (const place of PLACES) {
      for (const noon of NOONS) {
        // Three hours after the SPA's sunrise of that local day.
        const exact = sunDay(noon / 1000, place).sunriseT!;
        const asked = exact + 3 * 3600;
        const approx = approximateLastSunrise(asked, place);
        expect(approx).not.toBeNull();
        expect(approx!).toBeLessThanOrEqual(asked);
        expect(Math.abs(approx! - exact)).toBeLessThan(120);
      }
    }
  });

  it('gives the previous dawn before this morning’s sunrise, and null in polar night', () => {
    const place = PLACES[0]!;
    const today = sunDay(Date.UTC(2026, 11, 2, 19) / 1000, place).sunriseT!;
    const yesterday = sunDay(Date.UTC(2026, 11, 1, 19) / 1000, place).sunriseT!;
    expect(Math.abs(approximateLastSunrise(today - 600, place)! - yesterday)).toBeLessThan(120);
    const arctic = { latitudeDegrees: 78.2, longitudeDegrees: 15.6 };
    expect(approximateLastSunrise(Date.UTC(2026, 11, 21, 12) / 1000, arctic)).toBeNull();
  });
});
