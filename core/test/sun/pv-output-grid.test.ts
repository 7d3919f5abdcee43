import { describe, expect, it } from 'vitest';
import { clearSkyPvWatts, clearSkyPvWattsOnGrid, type PvArrayConfig } from '../../src/index.js';

// Our own approximation (no published value): the grid-interpolated clear-sky output must agree
// with the exact per-instant computation it replaces in the no_charge rule.
const ARRAYS: PvArrayConfig[] = [
  { key: 'house', ratedWatts: 1600, tiltDegrees: 30, azimuthDegrees: 180 },
  { key: 'shed', ratedWatts: 400, tiltDegrees: 15, azimuthDegrees: 250 },
];
const SITES = [
  { latitudeDegrees: 35.4, longitudeDegrees: -107.9, elevationMetres: 2000 },
  { latitudeDegrees: -31.9, longitudeDegrees: 115.9, elevationMetres: 20 },
  { latitudeDegrees: 62.5, longitudeDegrees: 25.7, elevationMetres: 100 },
];
const DAYS = [Date.UTC(2026, 2, 20), Date.UTC(2026, 5, 21), Date.UTC(2026, 11, 21)];

describe('clear-sky output on a 5-minute grid', () => {
  it('stays within 0.5 % of the rated power of the exact figure at every second-level instant', () => {
    const rated = ARRAYS.reduce((s, a) => s + a.ratedWatts, 0);
    let worst = 0;
    let checked = 0;
    for (const site of SITES) {
      for (const day of DAYS) {
        const onGrid = clearSkyPvWattsOnGrid(ARRAYS, site);
        // Every 97 s over 24 h: instants on and between grid points.
        for (let t = day / 1000; t < day / 1000 + 86_400; t += 97) {
          const exact = ARRAYS.reduce((s, a) => s + clearSkyPvWatts(a, t, site), 0);
          worst = Math.max(worst, Math.abs(onGrid(t) - exact));
          checked += 1;
        }
      }
    }
    expect(checked).toBeGreaterThan(7_000);
    expect(worst / rated).toBeLessThan(0.005);
    expect(worst).toBeGreaterThan(0); // interpolated, not recomputed at each instant
  });

  it('equals the exact figure on grid points', () => {
    const site = SITES[0]!;
    const onGrid = clearSkyPvWattsOnGrid(ARRAYS, site);
    const noon = Date.UTC(2026, 5, 21, 19) / 1000;
    const exact = ARRAYS.reduce((s, a) => s + clearSkyPvWatts(a, noon, site), 0);
    expect(onGrid(noon)).toBe(exact);
    expect(exact).toBeGreaterThan(1000);
  });

  it('keeps computed points across calls without mixing up arrays or places', () => {
    const site = SITES[1]!;
    const noon = Date.UTC(2026, 0, 15, 4) / 1000; // about noon at the southern site
    const exactFor = (arrays: PvArrayConfig[], at = site) =>
      arrays.reduce((s, a) => s + clearSkyPvWatts(a, noon, at), 0);
    const first = clearSkyPvWattsOnGrid(ARRAYS, site)(noon);
    const again = clearSkyPvWattsOnGrid(ARRAYS, site)(noon);
    expect(again).toBe(first);
    // Same place, other arrays (a re-rated array after an edit), and same arrays elsewhere.
    const rerated = ARRAYS.map((a) => ({ ...a, ratedWatts: a.ratedWatts * 2 }));
    expect(clearSkyPvWattsOnGrid(rerated, site)(noon)).toBe(exactFor(rerated));
    expect(clearSkyPvWattsOnGrid(ARRAYS, SITES[2]!)(noon)).toBe(exactFor(ARRAYS, SITES[2]!));
    expect(clearSkyPvWattsOnGrid(ARRAYS, site)(noon)).toBe(exactFor(ARRAYS));
    expect(exactFor(rerated)).toBeGreaterThan(exactFor(ARRAYS));
  });

  it('stays correct past the points it keeps for one place (a day of 5-minute points)', () => {
    const site = SITES[0]!;
    const day = Date.UTC(2026, 5, 21) / 1000;
    const onGrid = clearSkyPvWattsOnGrid(ARRAYS, site);
    for (let pass = 0; pass < 2; pass++) {
      for (let g = day; g < day + 86_400; g += 300) {
        expect(onGrid(g)).toBe(ARRAYS.reduce((s, a) => s + clearSkyPvWatts(a, g, site), 0));
      }
    }
  });
});
