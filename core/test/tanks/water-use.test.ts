import { describe, expect, it } from 'vitest';
import {
  type Sample,
  type TankConfig,
  dailyWaterUse,
  daysOfWaterLeft,
  waterUseFromLevels,
} from '../../src/index.js';

// A 2 m × 1 m rectangular cistern: 1 cm of level is 20 L.
const cistern: TankConfig = {
  key: 'cistern',
  geometry: { shape: 'rectangular', lengthMetres: 2, widthMetres: 1, heightMetres: 2 },
};

describe('water use from level history', () => {
  it('sums the falls and the rises separately', () => {
    const levels: Sample[] = [
      { t: 0, v: 1.5 },
      { t: 3600, v: 1.4 }, // −0.2 m³
      { t: 7200, v: 1.6 }, // +0.4 m³ (pump filled)
      { t: 10800, v: 1.3 }, // −0.6 m³
    ];
    const use = waterUseFromLevels(cistern, levels);
    expect(use.usedCubicMetres).toBeCloseTo(0.8, 9);
    expect(use.filledCubicMetres).toBeCloseTo(0.4, 9);
    expect(use.fromT).toBe(0);
    expect(use.toT).toBe(10800);
  });

  it('ignores sensor noise inside the dead band instead of adding it up', () => {
    const levels: Sample[] = [];
    for (let i = 0; i < 200; i += 1)
      levels.push({ t: i * 60, v: 1.2 + (i % 2 === 0 ? 0.004 : -0.004) });
    const use = waterUseFromLevels(cistern, levels);
    expect(use.usedCubicMetres).toBeLessThan(0.02);
  });

  it('uses a water balance when the inflow is known', () => {
    const levels: Sample[] = [
      { t: 0, v: 1.0 },
      { t: 3600, v: 1.1 },
    ];
    // 0.5 m³ pumped in, tank rose 0.2 m³: 0.3 m³ was drawn while the pump ran
    const use = waterUseFromLevels(cistern, levels, { inflowCubicMetres: 0.5 });
    expect(use.usedCubicMetres).toBeCloseTo(0.3, 9);
  });

  it('splits use by local day in the site time zone', () => {
    // Two days in UTC−7 (no DST in this zone), a 0.1 m fall each day at local noon.
    const zone = 'America/Phoenix';
    const midnight = Date.UTC(2024, 5, 1, 7) / 1000; // 2024-06-01 00:00 local
    const levels: Sample[] = [];
    for (let h = 0; h <= 47; h += 1) {
      const day = Math.floor(h / 24);
      const v = 1.5 - 0.1 * day - (h % 24 >= 12 ? 0.1 : 0);
      levels.push({ t: midnight + h * 3600, v });
    }
    const days = dailyWaterUse(cistern, levels, zone);
    expect(days.map((d) => d.date)).toEqual(['2024-06-01', '2024-06-02']);
    expect(days[0]?.usedCubicMetres).toBeCloseTo(0.2, 9);
    expect(days[1]?.usedCubicMetres).toBeCloseTo(0.2, 9);
    expect(days[0]?.complete).toBe(true);
  });
});

describe('days of water left', () => {
  it('divides what is above the reserve by the daily use', () => {
    expect(daysOfWaterLeft(3, 0.5)).toBe(6);
    expect(daysOfWaterLeft(3, 0.5, 1)).toBe(4);
    expect(daysOfWaterLeft(0.5, 0.5, 1)).toBe(0);
  });
  it('gives no forecast when nothing is being used, and never NaN', () => {
    expect(daysOfWaterLeft(3, 0)).toBeNull();
    expect(daysOfWaterLeft(3, -0.2)).toBeNull();
    expect(daysOfWaterLeft(Number.NaN, 0.5)).toBeNull();
    expect(daysOfWaterLeft(3, Number.NaN)).toBeNull();
  });
});
