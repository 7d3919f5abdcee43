import {
  cubicMetresToLitres,
  cubicMetresToUsGallons,
  socFromRestVoltage,
  tankVolumeFromLevel,
  type BatteryChemistry,
  type UnitSystem,
} from '@wellkept/core';
import { alignSeries } from '../../../lib/align-series';
import type { ChartSeries } from '../../../components/time-chart';
import type { SeriesResponse } from '../api/get-series';

/** What the charts need to know about the equipment (the route passes it in). */
export interface ChartEquipment {
  batteryBank: { chemistry: BatteryChemistry; nominalVoltageV: number; capacityAh: number } | null;
  tanks: {
    key: string;
    name: string;
    kind: 'storage' | 'pressure';
    geometry: 'vertical_cylinder' | 'horizontal_cylinder' | 'rectangular' | null;
    diameterM: number | null;
    lengthM: number | null;
    widthM: number | null;
    heightM: number | null;
    sensorOffsetM: number;
  }[];
  pumps: { key: string; name: string; ratedCurrentA: number }[];
  pvArrays: { key: string; name: string }[];
}

export interface ChartSpec {
  id: string;
  title: string;
  summary: string;
  t: number[];
  series: ChartSeries[];
  height?: number;
}

type Raw = SeriesResponse['series'][number];

function find(resp: SeriesResponse | undefined, channel: string): Raw | undefined {
  return resp?.series.find((s) => s.channel === channel);
}

function range(values: (number | null)[]): { min: number; max: number; last: number } | null {
  let min = Infinity;
  let max = -Infinity;
  let last: number | null = null;
  for (const v of values) {
    if (v === null) continue;
    if (v < min) min = v;
    if (v > max) max = v;
    last = v;
  }
  return last === null ? null : { min, max, last };
}

/** "Battery voltage went from 24.10 V to 27.90 V; the latest is 25.32 V." */
export function describe(
  label: string,
  values: (number | null)[],
  unit: string,
  digits: number,
): string {
  const r = range(values);
  if (!r) return `No ${label.toLowerCase()} readings in this range.`;
  const f = (v: number) => `${v.toFixed(digits)} ${unit}`.trim();
  return `${label} between ${f(r.min)} and ${f(r.max)}; latest ${f(r.last)}.`;
}

/** Voltage and current, and the state of charge estimated from the voltage. */
export function batteryCharts(
  resp: SeriesResponse | undefined,
  equipment: ChartEquipment,
  rangeWords: string,
): ChartSpec[] {
  const volts = find(resp, 'battery/voltage');
  const amps = find(resp, 'battery/current');
  if (!volts && !amps) return [];
  const parts = [volts, amps].filter((s): s is Raw => !!s);
  const { t, columns } = alignSeries(parts.map((s) => ({ t: s.t, values: s.mean })));
  const v = volts ? columns[0]! : [];
  const a = amps ? columns[volts ? 1 : 0]! : [];
  const charts: ChartSpec[] = [
    {
      id: 'battery',
      title: 'Battery',
      summary: `${describe('Voltage', v, 'V', 2)} ${amps ? describe('Current (positive is charging)', a, 'A', 1) : ''} Over ${rangeWords}.`,
      t,
      series: [
        ...(volts
          ? [{ label: 'Voltage', unit: 'V', values: v, colour: 1 as const, digits: 2 }]
          : []),
        ...(amps
          ? [
              {
                label: 'Current',
                unit: 'A',
                values: a,
                colour: 2 as const,
                rightAxis: !!volts,
                digits: 1,
              },
            ]
          : []),
      ],
    },
  ];
  const bank = equipment.batteryBank;
  if (volts && bank) {
    const config = {
      chemistry: bank.chemistry,
      nominalVolts: bank.nominalVoltageV,
      capacityAmpHours: bank.capacityAh,
    };
    const soc = v.map((volt) => {
      if (volt === null) return null;
      const estimate = socFromRestVoltage(config, volt);
      return estimate.socFraction === null ? null : estimate.socFraction * 100;
    });
    charts.push({
      id: 'soc',
      title: 'State of charge (estimated)',
      summary: `${describe('Estimated state of charge', soc, '%', 0)} Read from voltage, so it runs high while charging and low under load.`,
      t,
      height: 140,
      series: [
        { label: 'State of charge', unit: '%', values: soc, colour: 1, fill: true, digits: 0 },
      ],
    });
  }
  return charts;
}

/** Each storage tank: water in storage (gal or L) and percent full, from its level. */
export function waterCharts(
  resp: SeriesResponse | undefined,
  equipment: ChartEquipment,
  system: UnitSystem,
  rangeWords: string,
): ChartSpec[] {
  const charts: ChartSpec[] = [];
  for (const tank of equipment.tanks) {
    const level = find(resp, `tank/${tank.key}/level`);
    if (!level || tank.kind !== 'storage' || !tank.geometry) continue;
    const geometry =
      tank.geometry === 'vertical_cylinder'
        ? {
            shape: tank.geometry,
            diameterMetres: tank.diameterM ?? 0,
            heightMetres: tank.heightM ?? 0,
          }
        : tank.geometry === 'horizontal_cylinder'
          ? {
              shape: tank.geometry,
              diameterMetres: tank.diameterM ?? 0,
              lengthMetres: tank.lengthM ?? 0,
            }
          : {
              shape: tank.geometry,
              lengthMetres: tank.lengthM ?? 0,
              widthMetres: tank.widthM ?? 0,
              heightMetres: tank.heightM ?? 0,
            };
    const config = { key: tank.key, geometry, sensorOffsetMetres: tank.sensorOffsetM };
    const volume: (number | null)[] = [];
    const percent: (number | null)[] = [];
    for (const m of level.mean) {
      const r = tankVolumeFromLevel(config, m);
      volume.push(
        r.ok
          ? system === 'us'
            ? cubicMetresToUsGallons(r.cubicMetres)
            : cubicMetresToLitres(r.cubicMetres)
          : null,
      );
      percent.push(r.ok ? r.fractionFull * 100 : null);
    }
    const unit = system === 'us' ? 'gal' : 'L';
    charts.push({
      id: `tank-${tank.key}`,
      title: `Water in ${tank.name}`,
      summary: `${describe('Water in storage', volume, unit, 0)} ${describe('Fullness', percent, '%', 0)} Over ${rangeWords}.`,
      t: level.t,
      series: [
        { label: 'Stored', unit, values: volume, colour: 1, fill: true, digits: 0 },
        { label: 'Full', unit: '%', values: percent, colour: 3, rightAxis: true, digits: 0 },
      ],
    });
  }
  return charts;
}

/** One lane per pump: share of each point's time running, and motor current. */
export function pumpCharts(
  resp: SeriesResponse | undefined,
  equipment: ChartEquipment,
  rangeWords: string,
): ChartSpec[] {
  const charts: ChartSpec[] = [];
  for (const pump of equipment.pumps) {
    const running = find(resp, `pump/${pump.key}/running`);
    const current = find(resp, `pump/${pump.key}/current`);
    if (!running && !current) continue;
    const parts = [running, current].filter((s): s is Raw => !!s);
    const { t, columns } = alignSeries(parts.map((s) => ({ t: s.t, values: s.mean })));
    const on = running ? columns[0]!.map((v) => (v === null ? null : v * 100)) : [];
    const amps = current ? columns[running ? 1 : 0]! : [];
    const onShare = range(on);
    charts.push({
      id: `pump-${pump.key}`,
      title: pump.name,
      summary: `${running && onShare ? `Running up to ${onShare.max.toFixed(0)} % of each interval.` : 'No running state.'} ${current ? describe('Current', amps, 'A', 1) : ''} Rated ${pump.ratedCurrentA} A. Over ${rangeWords}.`,
      t,
      height: 120,
      series: [
        ...(running
          ? [
              {
                label: 'Running',
                unit: '%',
                values: on,
                colour: 1 as const,
                stepped: true,
                fill: true,
                digits: 0,
              },
            ]
          : []),
        ...(current
          ? [
              {
                label: 'Current',
                unit: 'A',
                values: amps,
                colour: 2 as const,
                rightAxis: !!running,
                digits: 1,
              },
            ]
          : []),
      ],
    });
  }
  return charts;
}

/** PV power per array, from mean volts × mean amps of each point (close, not exact). */
export function pvCharts(
  resp: SeriesResponse | undefined,
  equipment: ChartEquipment,
  rangeWords: string,
): ChartSpec[] {
  const series: { label: string; t: number[]; values: (number | null)[] }[] = [];
  for (const array of equipment.pvArrays) {
    const v = find(resp, `pv/${array.key}/voltage`);
    const a = find(resp, `pv/${array.key}/current`);
    if (!v || !a) continue;
    const { t, columns } = alignSeries([
      { t: v.t, values: v.mean },
      { t: a.t, values: a.mean },
    ]);
    series.push({
      label: array.name,
      t,
      values: columns[0]!.map((volts, i) => {
        const amps = columns[1]![i];
        return volts === null || amps === null || amps === undefined ? null : volts * amps;
      }),
    });
  }
  if (!series.length) return [];
  const { t, columns } = alignSeries(series.map((s) => ({ t: s.t, values: s.values })));
  return [
    {
      id: 'pv',
      title: 'Solar (PV) power',
      summary: `${series.map((s, i) => describe(s.label, columns[i]!, 'W', 0)).join(' ')} Over ${rangeWords}; from mean volts × amps.`,
      t,
      series: series.map((s, i) => ({
        label: s.label,
        unit: 'W',
        values: columns[i]!,
        colour: ((i % 4) + 1) as 1 | 2 | 3 | 4,
        digits: 0,
      })),
    },
  ];
}

/** The channels a site's charts ask for, grouped so each request stays within 12. */
export function chartChannelGroups(equipment: ChartEquipment, available: Set<string>): string[][] {
  const want = (names: string[]) => names.filter((n) => available.has(n));
  return [
    want(['battery/voltage', 'battery/current']),
    want(equipment.tanks.map((t) => `tank/${t.key}/level`)),
    want(equipment.pumps.flatMap((p) => [`pump/${p.key}/running`, `pump/${p.key}/current`])).slice(
      0,
      12,
    ),
    want(equipment.pvArrays.flatMap((a) => [`pv/${a.key}/voltage`, `pv/${a.key}/current`])).slice(
      0,
      12,
    ),
  ].filter((g) => g.length > 0);
}
