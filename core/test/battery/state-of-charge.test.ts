import { describe, expect, it } from 'vitest';
import {
  type BatteryBankConfig,
  FLOODED_REST_CURVE,
  LIFEPO4_REST_CURVE,
  bankEnergyWattHours,
  cellVoltsFromSpecificGravity,
  cellsInSeries,
  restVoltsAtReferenceTemperature,
  socFromRestVoltage,
} from '../../src/index.js';

const flooded12: BatteryBankConfig = {
  chemistry: 'flooded',
  nominalVolts: 12,
  capacityAmpHours: 225,
};
const flooded24: BatteryBankConfig = {
  chemistry: 'flooded',
  nominalVolts: 24,
  capacityAmpHours: 450,
};
const lfp24: BatteryBankConfig = { chemistry: 'lifepo4', nominalVolts: 24, capacityAmpHours: 200 };

/** Rested SOC in percent at 80 °F (the table's temperature: no correction). */
function socPercent(bank: BatteryBankConfig, volts: number): number {
  const estimate = socFromRestVoltage(bank, volts);
  if (estimate.socFraction === null) throw new Error('indeterminate');
  return estimate.socFraction * 100;
}

describe('flooded lead-acid rested voltage → state of charge', () => {
  // source: common practice: widely reproduced industry table (memory of the usual battery-council figures)
  // tolerance: ±3 % SOC
  const table: [number, number, number][] = [
    [100, 12.65, 25.3],
    [75, 12.45, 24.9],
    [50, 12.24, 24.48],
    [25, 12.06, 24.12],
    [0, 11.89, 23.78],
  ];
  for (const [percent, v12, v24] of table) {
    it(`${percent} % at ${v12} V (12 V bank) and ${v24} V (24 V bank)`, () => {
      expect(Math.abs(socPercent(flooded12, v12) - percent)).toBeLessThanOrEqual(3);
      expect(Math.abs(socPercent(flooded24, v24) - percent)).toBeLessThanOrEqual(3);
      // per cell ÷ 6
      expect(FLOODED_REST_CURVE.points[percent / 25]?.cellVolts).toBeCloseTo(v12 / 6, 9);
    });
  }

  it('interpolates 12.345 V to 62.5 %', () => {
    // source: derived (linear interpolation between the 50 % and 75 % rows); tolerance ±3 % SOC
    expect(Math.abs(socPercent(flooded12, 12.345) - 62.5)).toBeLessThanOrEqual(3);
    expect(socPercent(flooded12, 12.345)).toBeCloseTo(62.5, 6);
  });

  it('carries a narrow band and says "good" for a flooded bank mid-range', () => {
    const estimate = socFromRestVoltage(flooded12, 12.3);
    expect(estimate.confidence).toBe('good');
    expect(estimate.lowFraction).toBeLessThan(estimate.socFraction as number);
    expect(estimate.highFraction).toBeGreaterThan(estimate.socFraction as number);
  });

  it('corrects a cold reading up to the table temperature', () => {
    // a cold bank reads lower at the same charge; the corrected voltage is higher
    expect(
      restVoltsAtReferenceTemperature(flooded12, 12.2, { temperatureCelsius: 5 }),
    ).toBeGreaterThan(12.2);
    expect(restVoltsAtReferenceTemperature(flooded12, 12.2)).toBe(12.2);
  });
});

describe('flooded cell rule of thumb', () => {
  it('cell OCV ≈ specific gravity + 0.84: 1.265 → 2.105 V', () => {
    // source: common practice; tolerance ±0.01 V
    expect(Math.abs(cellVoltsFromSpecificGravity(1.265) - 2.105)).toBeLessThanOrEqual(0.01);
  });
});

describe('LiFePO4 rest voltage', () => {
  it('uses the published 11-point cell curve', () => {
    // source: Zephyr RTOS, include/zephyr/dt-bindings/battery/battery.h, default LFP curve (published)
    expect(LIFEPO4_REST_CURVE.points.map((p) => p.cellVolts)).toEqual([
      2.013, 3.068, 3.159, 3.194, 3.21, 3.221, 3.229, 3.246, 3.256, 3.262, 3.348,
    ]);
    expect(LIFEPO4_REST_CURVE.points.map((p) => Math.round(p.socFraction * 100))).toEqual([
      0, 10, 20, 30, 40, 50, 60, 70, 80, 90, 100,
    ]);
  });

  it('on the plateau (20–90 %) it reports indeterminate, not a sharp figure', () => {
    // source: Zephyr RTOS, include/zephyr/dt-bindings/battery/battery.h, default LFP curve (published)
    // tolerance: between 20 % and 90 % the curve moves 0.10 V per cell -> wide band or indeterminate
    for (const cell of [3.17, 3.2, 3.225, 3.25]) {
      const estimate = socFromRestVoltage(lfp24, cell * 8);
      expect(estimate.confidence).toBe('indeterminate');
      expect(estimate.socFraction).toBeNull();
      expect(estimate.highFraction - estimate.lowFraction).toBeGreaterThanOrEqual(0.7 - 1e-9);
    }
  });

  it('off the plateau it gives a figure: an 8-cell pack at 8 × 3.068 V is 10 %', () => {
    const low = socFromRestVoltage(lfp24, 8 * 3.068);
    expect(low.socFraction).toBeCloseTo(0.1, 6);
    const full = socFromRestVoltage(lfp24, 8 * 3.348);
    expect(full.socFraction).toBeCloseTo(1, 6);
  });
});

describe('bank arithmetic', () => {
  it('cells in series = nominal / 2 (lead-acid) or / 3.2 (LiFePO4); Wh = V × Ah', () => {
    // source: derived; tolerance exact
    expect(cellsInSeries(flooded12)).toBe(6);
    expect(cellsInSeries(flooded24)).toBe(12);
    expect(cellsInSeries({ chemistry: 'gel', nominalVolts: 48, capacityAmpHours: 100 })).toBe(24);
    expect(cellsInSeries(lfp24)).toBe(8);
    expect(cellsInSeries({ chemistry: 'lifepo4', nominalVolts: 12.8, capacityAmpHours: 100 })).toBe(
      4,
    );
    expect(bankEnergyWattHours(flooded24)).toBe(24 * 450);
  });

  it('never returns NaN for a bad voltage', () => {
    const estimate = socFromRestVoltage(flooded12, Number.NaN);
    expect(estimate).toMatchObject({ socFraction: null, confidence: 'indeterminate' });
  });
});
