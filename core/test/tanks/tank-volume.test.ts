import { describe, expect, it } from 'vitest';
import {
  type TankConfig,
  cubicMetresToUsGallons,
  horizontalCylinderVolumeCubicMetres,
  inchesToMetres,
  levelFromTankVolume,
  tankCapacityCubicMetres,
  tankGeometryFrom,
  tankVolumeFromLevel,
} from '../../src/index.js';

const horizontal48x96: TankConfig = {
  key: 'cistern',
  geometry: {
    shape: 'horizontal_cylinder',
    diameterMetres: inchesToMetres(48),
    lengthMetres: inchesToMetres(96),
  },
};

function volumeOrFail(tank: TankConfig, level: number): number {
  const result = tankVolumeFromLevel(tank, level);
  if (!result.ok) throw new Error(result.reason);
  return result.cubicMetres;
}

describe('horizontal cylinder, partly full', () => {
  it('D 48 in × L 96 in holds 752.0 gal full and 280.9 gal (37.4 %) at 19.2 in', () => {
    // source: tankvolumecalc.com and hackmath.net problem 3613 (published worked examples); tolerance ±0.1 gal
    const full = cubicMetresToUsGallons(tankCapacityCubicMetres(horizontal48x96.geometry));
    expect(Math.abs(full - 752.0)).toBeLessThanOrEqual(0.1);
    const part = tankVolumeFromLevel(horizontal48x96, inchesToMetres(19.2));
    expect(part.ok).toBe(true);
    if (!part.ok) return;
    expect(Math.abs(cubicMetresToUsGallons(part.cubicMetres) - 280.9)).toBeLessThanOrEqual(0.1);
    expect(Math.abs(part.fractionFull * 100 - 37.4)).toBeLessThanOrEqual(0.1);
  });

  it('L 10 m, r 0.725 m, h 1.25 m holds 15.138 m³', () => {
    // source: tankvolumecalc.com and hackmath.net problem 3613 (published worked examples); tolerance ±0.001 m³
    expect(
      Math.abs(horizontalCylinderVolumeCubicMetres(0.725, 10, 1.25) - 15.138),
    ).toBeLessThanOrEqual(0.001);
  });

  it('depth % to volume % for any horizontal cylinder', () => {
    // source: derived; tolerance ±0.1
    const table: [number, number][] = [
      [10, 5.2],
      [25, 19.6],
      [40, 37.4],
      [50, 50],
      [75, 80.4],
      [90, 94.8],
    ];
    for (const diameter of [0.5, 1.2, 3]) {
      const tank: TankConfig = {
        key: 't',
        geometry: { shape: 'horizontal_cylinder', diameterMetres: diameter, lengthMetres: 2.7 },
      };
      for (const [depthPercent, volumePercent] of table) {
        const r = tankVolumeFromLevel(tank, (diameter * depthPercent) / 100);
        expect(r.ok && Math.abs(r.fractionFull * 100 - volumePercent)).toBeLessThanOrEqual(0.1);
      }
    }
  });

  it('edges: empty at h = 0, full at h = 2r, clamped with a flag just outside, refused further out', () => {
    // source: common practice; tolerance exact
    const capacity = tankCapacityCubicMetres(horizontal48x96.geometry);
    expect(volumeOrFail(horizontal48x96, 0)).toBe(0);
    expect(volumeOrFail(horizontal48x96, inchesToMetres(48))).toBeCloseTo(capacity, 12);
    const over = tankVolumeFromLevel(horizontal48x96, inchesToMetres(48) + 0.05);
    expect(over).toMatchObject({ ok: true, clamped: 'above_top', fractionFull: 1 });
    const under = tankVolumeFromLevel(horizontal48x96, -0.02);
    expect(under).toMatchObject({ ok: true, clamped: 'below_floor', cubicMetres: 0 });
    const far = tankVolumeFromLevel(horizontal48x96, 5);
    expect(far.ok).toBe(false);
    if (!far.ok) expect(far.reason).toMatch(/outside the tank/);
    for (const bad of [Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY]) {
      const r = tankVolumeFromLevel(horizontal48x96, bad);
      expect(r.ok).toBe(false);
    }
  });
});

describe('vertical cylinder and rectangular tanks', () => {
  it('vertical cylinder volume rises linearly with depth, after the sensor offset', () => {
    const tank: TankConfig = {
      key: 'upright',
      geometry: { shape: 'vertical_cylinder', diameterMetres: 2, heightMetres: 2.5 },
      sensorOffsetMetres: 0.1,
    };
    // reading 0.9 m + 0.1 m offset = 1.0 m of water: π r² h = π m³
    expect(volumeOrFail(tank, 0.9)).toBeCloseTo(Math.PI, 12);
    expect(tankCapacityCubicMetres(tank.geometry)).toBeCloseTo(Math.PI * 2.5, 12);
  });

  it('rectangular tank: length × width × depth', () => {
    const tank: TankConfig = {
      key: 'cistern',
      geometry: { shape: 'rectangular', lengthMetres: 3, widthMetres: 2, heightMetres: 1.5 },
    };
    expect(volumeOrFail(tank, 0.75)).toBeCloseTo(4.5, 12);
    const r = tankVolumeFromLevel(tank, 0.75);
    expect(r.ok && r.fractionFull).toBeCloseTo(0.5, 12);
  });

  it('refuses a tank with a zero or missing dimension with a reason, never NaN', () => {
    const r = tankVolumeFromLevel(
      { key: 'bad', geometry: { shape: 'vertical_cylinder', diameterMetres: 0, heightMetres: 2 } },
      1,
    );
    expect(r).toEqual({
      ok: false,
      reason: 'tank bad: tank diameter must be a positive number of metres, got 0',
    });
  });

  it('level from volume inverts volume from level for every shape', () => {
    const tanks: TankConfig[] = [
      horizontal48x96,
      {
        key: 'v',
        geometry: { shape: 'vertical_cylinder', diameterMetres: 1.8, heightMetres: 2 },
        sensorOffsetMetres: 0.05,
      },
      {
        key: 'r',
        geometry: { shape: 'rectangular', lengthMetres: 2, widthMetres: 2, heightMetres: 1 },
      },
    ];
    for (const tank of tanks) {
      const capacity = tankCapacityCubicMetres(tank.geometry);
      for (const fraction of [0, 0.07, 0.33, 0.5, 0.81, 1]) {
        const level = levelFromTankVolume(tank, capacity * fraction);
        expect(level).not.toBeNull();
        expect(volumeOrFail(tank, level as number)).toBeCloseTo(capacity * fraction, 9);
      }
    }
  });
});

// Our own contract (no published value): which stored dimensions make a countable tank.
describe('tankGeometryFrom', () => {
  const none = { diameterMetres: null, lengthMetres: null, widthMetres: null, heightMetres: null };
  it('takes the dimensions each shape needs and ignores the others', () => {
    expect(
      tankGeometryFrom({
        ...none,
        shape: 'vertical_cylinder',
        diameterMetres: 2,
        heightMetres: 2.4,
        lengthMetres: 9,
      }),
    ).toEqual({ shape: 'vertical_cylinder', diameterMetres: 2, heightMetres: 2.4 });
    expect(
      tankGeometryFrom({
        ...none,
        shape: 'horizontal_cylinder',
        diameterMetres: 1.2,
        lengthMetres: 3,
      }),
    ).toEqual({ shape: 'horizontal_cylinder', diameterMetres: 1.2, lengthMetres: 3 });
    expect(
      tankGeometryFrom({
        shape: 'rectangular',
        diameterMetres: 5,
        lengthMetres: 4,
        widthMetres: 3,
        heightMetres: 2,
      }),
    ).toEqual({ shape: 'rectangular', lengthMetres: 4, widthMetres: 3, heightMetres: 2 });
  });
  it('is null without a shape or without a dimension the shape needs', () => {
    expect(
      tankGeometryFrom({ ...none, shape: null, diameterMetres: 2, heightMetres: 2 }),
    ).toBeNull();
    expect(tankGeometryFrom({ ...none, shape: 'vertical_cylinder', diameterMetres: 2 })).toBeNull();
    expect(
      tankGeometryFrom({
        ...none,
        shape: 'horizontal_cylinder',
        diameterMetres: 1.2,
        heightMetres: 1,
      }),
    ).toBeNull();
    expect(
      tankGeometryFrom({ ...none, shape: 'rectangular', lengthMetres: 4, widthMetres: 3 }),
    ).toBeNull();
    expect(
      tankGeometryFrom({
        ...none,
        shape: 'rectangular',
        lengthMetres: 4,
        widthMetres: 0,
        heightMetres: 2,
      }),
    ).toBeNull();
  });
});
