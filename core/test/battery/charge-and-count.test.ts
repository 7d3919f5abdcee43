import { describe, expect, it } from 'vitest';
import {
  type BatteryBankConfig,
  type Sample,
  chargeSetpoints,
  countAmpHours,
  estimateStateOfCharge,
  findRestPeriods,
  overnightSummary,
  socFromAmpHours,
  socFromRestVoltage,
} from '../../src/index.js';

const gel24: BatteryBankConfig = { chemistry: 'gel', nominalVolts: 24, capacityAmpHours: 400 };
const flooded24: BatteryBankConfig = {
  chemistry: 'flooded',
  nominalVolts: 24,
  capacityAmpHours: 400,
};

describe('charge setpoints', () => {
  it('gel: absorption 2.40 V/cell (28.80 V on 24 V), float 2.25 V/cell (27.00 V)', () => {
    // source: common practice (makers' tables); tolerance exact
    const s = chargeSetpoints(gel24);
    expect(s.absorptionVolts).toBe(28.8);
    expect(s.floatVolts).toBe(27);
  });

  it('temperature compensation −5 mV/°C/cell: 28.80 V at 25 °C → 28.20 V at 35 °C, 30.30 V at 0 °C', () => {
    // source: Battery University BU-403 (−3, published); −5 is common in charger manuals (memory)
    // tolerance: exact arithmetic (derived)
    const options = { compensationMillivoltsPerCelsiusPerCell: -5 };
    expect(chargeSetpoints(gel24, { ...options, temperatureCelsius: 25 }).absorptionVolts).toBe(
      28.8,
    );
    expect(chargeSetpoints(gel24, { ...options, temperatureCelsius: 35 }).absorptionVolts).toBe(
      28.2,
    );
    expect(chargeSetpoints(gel24, { ...options, temperatureCelsius: 0 }).absorptionVolts).toBe(
      30.3,
    );
  });

  it('the coefficient is a setting: −3 mV/°C/cell gives 28.44 V at 35 °C', () => {
    // source: Battery University BU-403 (−3, published)
    const s = chargeSetpoints(gel24, {
      compensationMillivoltsPerCelsiusPerCell: -3,
      temperatureCelsius: 35,
    });
    expect(s.absorptionVolts).toBe(28.44);
  });

  it('LiFePO4 gets no temperature compensation by default', () => {
    const lfp: BatteryBankConfig = {
      chemistry: 'lifepo4',
      nominalVolts: 24,
      capacityAmpHours: 200,
    };
    expect(chargeSetpoints(lfp, { temperatureCelsius: 0 }).compensationVolts).toBe(0);
  });
});

const steady = (fromT: number, toT: number, stepSeconds: number, amps: number): Sample[] => {
  const out: Sample[] = [];
  for (let t = fromT; t <= toT; t += stepSeconds) out.push({ t, v: amps });
  return out;
};

describe('amp-hour counting', () => {
  it('integrates current, applies charge efficiency, and keeps charge and discharge apart', () => {
    const currents = [...steady(0, 3600, 60, 10), ...steady(3660, 7200, 60, -5)];
    const count = countAmpHours(flooded24, currents, 0, 7200, { chargeEfficiency: 0.8 });
    // 10 A for 1 h, then the step to −5 A crosses zero 40 s into the 60 s interval
    expect(count.chargedAmpHours).toBeCloseTo(10 + (10 * 40) / 2 / 3600, 9);
    expect(count.dischargedAmpHours).toBeCloseTo((5 * 3540) / 3600 + (5 * 20) / 2 / 3600, 9);
    expect(count.netAmpHours).toBeCloseTo(
      count.chargedAmpHours * 0.8 - count.dischargedAmpHours,
      9,
    );
    expect(count.gapSeconds).toBe(0);
  });

  it('does not guess across a data gap; the gap widens the band', () => {
    const currents = [...steady(0, 1800, 60, -10), ...steady(9000, 10800, 60, -10)];
    const count = countAmpHours(flooded24, currents, 0, 10800);
    expect(count.gapSeconds).toBe(7200);
    expect(count.dischargedAmpHours).toBeCloseTo(10, 6);
    const anchor = { t: 0, estimate: socFromRestVoltage(flooded24, 25.3) };
    const withGap = socFromAmpHours(flooded24, anchor, currents, 10800);
    const noGap = socFromAmpHours(flooded24, anchor, steady(0, 10800, 60, -10 / 3), 10800);
    expect(withGap.highFraction - withGap.lowFraction).toBeGreaterThan(
      noGap.highFraction - noGap.lowFraction,
    );
    expect(withGap.note).toMatch(/missing data/);
  });

  it('re-anchors at a rest and counts from there', () => {
    // rest for 3 h at 24.9 V (≈ 75 %), then a 40 Ah draw (10 % of 400 Ah)
    const currents = [
      ...steady(0, 3 * 3600, 300, 0.1),
      ...steady(3 * 3600 + 60, 7 * 3600, 300, -10),
    ];
    const voltages = [
      ...steady(0, 3 * 3600, 300, 24.9),
      ...steady(3 * 3600 + 60, 7 * 3600, 300, 24.4),
    ];
    const rests = findRestPeriods(flooded24, currents);
    expect(rests).toHaveLength(1);
    const estimate = estimateStateOfCharge({ bank: flooded24, voltages, currents, atT: 7 * 3600 });
    expect(estimate.method).toBe('amp_hours');
    expect(estimate.socFraction).toBeCloseTo(0.75 - 40 / 400, 1);
  });

  it('without any rest or float it says the figure is rough', () => {
    const estimate = estimateStateOfCharge({
      bank: flooded24,
      voltages: [{ t: 100, v: 24.6 }],
      currents: [{ t: 100, v: -12 }],
      atT: 100,
    });
    expect(estimate.confidence).toBe('wide');
  });
});

describe('overnight drop and depth of discharge', () => {
  it('measures dusk-to-dawn drop and depth of discharge from amp-hours', () => {
    const dusk = 0;
    const dawn = 10 * 3600;
    const voltages: Sample[] = [];
    for (let t = dusk; t <= dawn; t += 600)
      voltages.push({ t, v: 25.2 - (0.4 * (t - dusk)) / (dawn - dusk) });
    const currents = steady(dusk, dawn, 600, -4); // 40 Ah over the night
    const night = overnightSummary(flooded24, voltages, currents, { startT: dusk, endT: dawn });
    expect(night).not.toBeNull();
    expect(night?.dropVolts).toBeCloseTo(0.4 - (2 * (0.4 * 900)) / 36000, 2);
    expect(night?.minVolts).toBeCloseTo(24.8, 6);
    expect(night?.dischargedAmpHours).toBeCloseTo(40, 6);
    expect(night?.depthOfDischargeFraction).toBeCloseTo(0.1, 6);
    expect(night?.depthOfDischargeBasis).toBe('amp_hours');
  });
});
