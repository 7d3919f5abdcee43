import { describe, expect, it } from 'vitest';
import type { SeriesResponse } from '../api/get-series';
import { batteryCharts, waterCharts, type ChartEquipment } from './chart-data';

const equipment: ChartEquipment = {
  batteryBank: { chemistry: 'agm', nominalVoltageV: 24, capacityAh: 400 },
  // A 1 m × 1 m × 2 m rectangular tank holds 2 m³; its sensor reads from the floor.
  tanks: [
    {
      key: 'main',
      name: 'Main tank',
      kind: 'storage',
      geometry: 'rectangular',
      diameterM: null,
      lengthM: 1,
      widthM: 1,
      heightM: 2,
      sensorOffsetM: 0,
    },
  ],
  pumps: [],
  pvArrays: [],
};

const response = (series: SeriesResponse['series']): SeriesResponse => ({
  siteId: 's',
  from: '',
  to: '',
  resolution: { source: 'hour', stepSeconds: 3600, label: '1 h' },
  rowsRead: 0,
  series,
});

describe('chart data', () => {
  it('turns tank level into gallons or litres and percent full', () => {
    const resp = response([
      {
        channel: 'tank/main/level',
        unit: 'm',
        valueKind: 'number',
        t: [0, 3600_000],
        mean: [1, 0.5],
        min: [1, 0.5],
        max: [1, 0.5],
      },
    ]);
    const [us] = waterCharts(resp, equipment, 'us', 'a day');
    expect(us!.series[0]!.unit).toBe('gal');
    expect(us!.series[0]!.values[0]).toBeCloseTo(264.172, 2); // 1 m³
    expect(us!.series[1]!.values).toEqual([50, 25]);
    const [metric] = waterCharts(resp, equipment, 'metric', 'a day');
    expect(metric!.series[0]!.unit).toBe('L');
    expect(metric!.series[0]!.values).toEqual([1000, 500]);
    expect(metric!.summary).toContain('between 500 L and 1000 L');
  });

  it('charts battery voltage and current on two axes and estimates the charge', () => {
    const resp = response([
      {
        channel: 'battery/voltage',
        unit: 'V',
        valueKind: 'number',
        t: [0, 1],
        mean: [25.5, 24.0],
        min: [0, 0],
        max: [0, 0],
      },
      {
        channel: 'battery/current',
        unit: 'A',
        valueKind: 'number',
        t: [0, 1],
        mean: [3, -4],
        min: [0, 0],
        max: [0, 0],
      },
    ]);
    const [main, soc] = batteryCharts(resp, equipment, 'a day');
    expect(main!.series.map((s) => [s.unit, !!s.rightAxis])).toEqual([
      ['V', false],
      ['A', true],
    ]);
    expect(soc!.series[0]!.unit).toBe('%');
    const [high, low] = soc!.series[0]!.values as number[];
    expect(high).toBeGreaterThan(low!);
  });

  it('draws nothing for a site without the channels', () => {
    expect(waterCharts(response([]), equipment, 'us', 'a day')).toEqual([]);
    expect(batteryCharts(response([]), equipment, 'a day')).toEqual([]);
  });
});
