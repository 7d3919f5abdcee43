import {
  type OpenAlert,
  type RuleInput,
  type Sample,
  type SiteConfig,
  levelFromTankVolume,
  tankCapacityCubicMetres,
} from '../../src/index.js';

/** A fictional ranch site: a well pump filling a cistern, a booster, a 24 V flooded bank, one array. */
export function ranchSite(overrides: Partial<SiteConfig> = {}): SiteConfig {
  return {
    timeZone: 'America/Denver',
    location: { latitudeDegrees: 35.1, longitudeDegrees: -106.6, elevationMetres: 1600 },
    battery: { chemistry: 'flooded', nominalVolts: 24, capacityAmpHours: 400 },
    pvArrays: [
      { key: 'roof', ratedWatts: 1200, tiltDegrees: 35, azimuthDegrees: 180, derate: 0.8 },
    ],
    pumps: [
      {
        key: 'well',
        role: 'well',
        ratedCurrentAmps: 8,
        ratedFlowCubicMetresPerSecond: 0.0003,
        supplyVolts: 24,
        fillsTankKey: 'cistern',
        supply: 'battery',
      },
      { key: 'booster', role: 'booster', ratedCurrentAmps: 6, supplyVolts: 24, supply: 'battery' },
    ],
    tanks: [
      {
        key: 'cistern',
        geometry: { shape: 'vertical_cylinder', diameterMetres: 2.4, heightMetres: 2.2 },
      },
    ],
    floatSwitches: [{ key: 'fill', tankKey: 'cistern', pumpKey: 'well', logic: 'closed_calls' }],
    gateways: [{ id: 'gw-ranch-1', reportingIntervalSeconds: 60 }],
    ...overrides,
  };
}

/** Samples every `step` seconds over [fromT, toT] with values from a function of time. */
export function series<T>(
  fromT: number,
  toT: number,
  step: number,
  value: (t: number) => T,
): Sample<T>[] {
  const out: Sample<T>[] = [];
  for (let t = fromT; t <= toT; t += step) out.push({ t, v: value(t) });
  return out;
}

/** The cistern's level reading at a share of full. */
export function cisternLevelAt(site: SiteConfig, fraction: number): number {
  const tank = site.tanks[0];
  if (!tank) throw new Error('no tank');
  return levelFromTankVolume(tank, tankCapacityCubicMetres(tank.geometry) * fraction) as number;
}

/** Builds a rule input. */
export function input(
  site: SiteConfig,
  nowT: number,
  seriesMap: RuleInput['series'],
  openAlerts: OpenAlert[] = [],
): RuleInput {
  return { nowT, site, series: seriesMap, openAlerts };
}
