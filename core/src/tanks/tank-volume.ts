/**
 * Water in storage from a level reading, for the three tank shapes installers fit: upright
 * (vertical) cylinders, horizontal cylinders lying on their side, and rectangular tanks or
 * cisterns. All dimensions are inside dimensions in metres; volumes are cubic metres.
 */

/** An upright cylinder: level rises along the axis. */
export interface VerticalCylinderTank {
  shape: 'vertical_cylinder';
  diameterMetres: number;
  heightMetres: number;
}

/** A cylinder lying on its side: level rises across the diameter. */
export interface HorizontalCylinderTank {
  shape: 'horizontal_cylinder';
  diameterMetres: number;
  lengthMetres: number;
}

/** A rectangular tank or cistern with a flat floor and upright walls. */
export interface RectangularTank {
  shape: 'rectangular';
  lengthMetres: number;
  widthMetres: number;
  heightMetres: number;
}

/** Tank geometry, by shape. */
export type TankGeometry = VerticalCylinderTank | HorizontalCylinderTank | RectangularTank;

/** Every tank shape, for forms. */
export const TANK_SHAPES: readonly TankGeometry['shape'][] = [
  'vertical_cylinder',
  'horizontal_cylinder',
  'rectangular',
];

/** A tank as configured at a site. */
export interface TankConfig {
  /** Equipment key, the `<tank>` in `tank/<tank>/level`. */
  key: string;
  geometry: TankGeometry;
  /**
   * Water depth when the level sensor reads zero, metres: a pressure sensor hung 0.10 m above
   * the floor has an offset of +0.10. Water depth = reading + offset. Default 0.
   */
  sensorOffsetMetres?: number;
}

/** Why a level was outside the tank. */
export type LevelClamp = 'below_floor' | 'above_top';

/** Volume in a tank at a level. */
export type TankVolumeResult =
  | {
      ok: true;
      /** Water in the tank, m³. */
      cubicMetres: number;
      /** Volume when full, m³. */
      capacityCubicMetres: number;
      /** 0–1. */
      fractionFull: number;
      /** Water depth above the floor used for the volume, m (after offset and clamping). */
      depthMetres: number;
      /** Set when the depth was outside [0, tank height] and was clamped to the nearest edge. */
      clamped: LevelClamp | null;
    }
  | { ok: false; reason: string };

/** How far outside the tank a depth may be before it is refused rather than clamped, metres. */
export const TANK_LEVEL_CLAMP_LIMIT_METRES = 0.5;

/** A tank's dimensions as stored, metres: each shape needs only some of them. */
export interface StoredTankDimensions {
  shape: TankGeometry['shape'] | null;
  diameterMetres: number | null;
  lengthMetres: number | null;
  widthMetres: number | null;
  heightMetres: number | null;
}

/**
 * The geometry of a stored tank, or null when its shape is not given or lacks a dimension the
 * shape needs (such a tank holds no water that can be counted).
 */
export function tankGeometryFrom(d: StoredTankDimensions): TankGeometry | null {
  if (d.shape === 'vertical_cylinder' && d.diameterMetres && d.heightMetres) {
    return {
      shape: 'vertical_cylinder',
      diameterMetres: d.diameterMetres,
      heightMetres: d.heightMetres,
    };
  }
  if (d.shape === 'horizontal_cylinder' && d.diameterMetres && d.lengthMetres) {
    return {
      shape: 'horizontal_cylinder',
      diameterMetres: d.diameterMetres,
      lengthMetres: d.lengthMetres,
    };
  }
  if (d.shape === 'rectangular' && d.lengthMetres && d.widthMetres && d.heightMetres) {
    return {
      shape: 'rectangular',
      lengthMetres: d.lengthMetres,
      widthMetres: d.widthMetres,
      heightMetres: d.heightMetres,
    };
  }
  return null;
}

/**
 * Checks a tank geometry; returns a reason when a dimension is not a positive finite number.
 */
export function tankGeometryProblem(geometry: TankGeometry): string | null {
  const dims: [string, number][] =
    geometry.shape === 'vertical_cylinder'
      ? [
          ['diameter', geometry.diameterMetres],
          ['height', geometry.heightMetres],
        ]
      : geometry.shape === 'horizontal_cylinder'
        ? [
            ['diameter', geometry.diameterMetres],
            ['length', geometry.lengthMetres],
          ]
        : [
            ['length', geometry.lengthMetres],
            ['width', geometry.widthMetres],
            ['height', geometry.heightMetres],
          ];
  for (const [label, value] of dims) {
    if (!Number.isFinite(value) || value <= 0) {
      return `tank ${label} must be a positive number of metres, got ${String(value)}`;
    }
  }
  return null;
}

/** Inside height of a tank (the depth at which it is full), metres. */
export function tankHeightMetres(geometry: TankGeometry): number {
  return geometry.shape === 'horizontal_cylinder' ? geometry.diameterMetres : geometry.heightMetres;
}

/** Volume of a full tank, m³. */
export function tankCapacityCubicMetres(geometry: TankGeometry): number {
  switch (geometry.shape) {
    case 'vertical_cylinder':
      return Math.PI * (geometry.diameterMetres / 2) ** 2 * geometry.heightMetres;
    case 'horizontal_cylinder':
      return Math.PI * (geometry.diameterMetres / 2) ** 2 * geometry.lengthMetres;
    case 'rectangular':
      return geometry.lengthMetres * geometry.widthMetres * geometry.heightMetres;
  }
}

/**
 * Volume of liquid in a horizontal cylinder filled to depth h (circular segment × length):
 * V(h) = L [r² acos((r−h)/r) − (r−h) √(2rh − h²)]. `depthMetres` must lie in [0, 2r].
 */
export function horizontalCylinderVolumeCubicMetres(
  radiusMetres: number,
  lengthMetres: number,
  depthMetres: number,
): number {
  const r = radiusMetres;
  const h = Math.min(Math.max(depthMetres, 0), 2 * r);
  const cosine = Math.min(Math.max((r - h) / r, -1), 1);
  const chordTerm = (r - h) * Math.sqrt(Math.max(2 * r * h - h * h, 0));
  return lengthMetres * (r * r * Math.acos(cosine) - chordTerm);
}

/** Volume of water at a depth already known to be inside the tank, m³. */
function volumeAtDepth(geometry: TankGeometry, depthMetres: number): number {
  switch (geometry.shape) {
    case 'vertical_cylinder':
      return Math.PI * (geometry.diameterMetres / 2) ** 2 * depthMetres;
    case 'horizontal_cylinder':
      return horizontalCylinderVolumeCubicMetres(
        geometry.diameterMetres / 2,
        geometry.lengthMetres,
        depthMetres,
      );
    case 'rectangular':
      return geometry.lengthMetres * geometry.widthMetres * depthMetres;
  }
}

/**
 * Water in a tank from a level sensor reading (metres). The sensor offset is added first. A
 * depth a little outside the tank (up to {@link TANK_LEVEL_CLAMP_LIMIT_METRES}) is clamped to the
 * floor or the top and flagged; further out, or a non-finite reading, gives `ok: false` with a
 * reason. Never returns NaN.
 */
export function tankVolumeFromLevel(tank: TankConfig, levelMetres: number): TankVolumeResult {
  const problem = tankGeometryProblem(tank.geometry);
  if (problem) return { ok: false, reason: `tank ${tank.key}: ${problem}` };
  const offset = tank.sensorOffsetMetres ?? 0;
  if (!Number.isFinite(offset)) {
    return { ok: false, reason: `tank ${tank.key}: sensor offset is not a number` };
  }
  if (!Number.isFinite(levelMetres)) {
    return { ok: false, reason: `tank ${tank.key}: level reading is not a number` };
  }
  const height = tankHeightMetres(tank.geometry);
  const rawDepth = levelMetres + offset;
  if (
    rawDepth < -TANK_LEVEL_CLAMP_LIMIT_METRES ||
    rawDepth > height + TANK_LEVEL_CLAMP_LIMIT_METRES
  ) {
    return {
      ok: false,
      reason: `tank ${tank.key}: water depth ${rawDepth.toFixed(3)} m is outside the tank (0–${height.toFixed(3)} m)`,
    };
  }
  let clamped: LevelClamp | null = null;
  let depth = rawDepth;
  if (rawDepth < 0) {
    clamped = 'below_floor';
    depth = 0;
  } else if (rawDepth > height) {
    clamped = 'above_top';
    depth = height;
  }
  const capacity = tankCapacityCubicMetres(tank.geometry);
  const cubicMetres = clamped === 'above_top' ? capacity : volumeAtDepth(tank.geometry, depth);
  return {
    ok: true,
    cubicMetres,
    capacityCubicMetres: capacity,
    fractionFull: cubicMetres / capacity,
    depthMetres: depth,
    clamped,
  };
}

/**
 * The level sensor reading (metres, before offset is added back) at which a tank holds the
 * given volume; the inverse of {@link tankVolumeFromLevel}. Volumes outside [0, capacity] are
 * clamped. Used by the simulator to turn water into a sensor reading. Returns null for a bad
 * geometry or a non-finite volume.
 */
export function levelFromTankVolume(tank: TankConfig, cubicMetres: number): number | null {
  if (tankGeometryProblem(tank.geometry) || !Number.isFinite(cubicMetres)) return null;
  const g = tank.geometry;
  const capacity = tankCapacityCubicMetres(g);
  const volume = Math.min(Math.max(cubicMetres, 0), capacity);
  const offset = tank.sensorOffsetMetres ?? 0;
  let depth: number;
  switch (g.shape) {
    case 'vertical_cylinder':
      depth = volume / (Math.PI * (g.diameterMetres / 2) ** 2);
      break;
    case 'rectangular':
      depth = volume / (g.lengthMetres * g.widthMetres);
      break;
    case 'horizontal_cylinder': {
      // The segment volume rises monotonically with depth: bisection to well under a micrometre.
      let low = 0;
      let high = g.diameterMetres;
      for (let i = 0; i < 60; i += 1) {
        const mid = (low + high) / 2;
        if (volumeAtDepth(g, mid) < volume) low = mid;
        else high = mid;
      }
      depth = (low + high) / 2;
      break;
    }
  }
  return depth - offset;
}
