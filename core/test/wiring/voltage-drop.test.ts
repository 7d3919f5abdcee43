import { describe, expect, it } from 'vitest';
import {
  COPPER_SOLID_OHMS_PER_1000_FEET,
  COPPER_STRANDED_OHMS_PER_1000_FEET,
  feetToMetres,
  twoWireVoltageDrop,
} from '../../src/index.js';

describe('conductor resistance table', () => {
  it('uncoated copper, 75 °C, Ω per 1000 ft — stranded column', () => {
    // source: NEC (NFPA 70) Chapter 9, Table 8; tolerance exact; column: stranded
    expect(COPPER_STRANDED_OHMS_PER_1000_FEET).toEqual({
      '14': 3.14,
      '12': 1.98,
      '10': 1.24,
      '8': 0.778,
      '6': 0.491,
      '4': 0.308,
      '2': 0.194,
      '1': 0.154,
      '1/0': 0.122,
    });
  });
  it('uncoated copper, 75 °C, Ω per 1000 ft — solid column', () => {
    // source: NEC (NFPA 70) Chapter 9, Table 8; tolerance exact; column: solid
    expect(COPPER_SOLID_OHMS_PER_1000_FEET).toEqual({
      '14': 3.07,
      '12': 1.93,
      '10': 1.21,
      '8': 0.764,
    });
  });
});

describe('two-wire DC voltage drop', () => {
  // source: derived from NEC Table 8; tolerance 0.001 V
  const cases: ['10' | '8' | '6' | '4', number, number][] = [
    ['10', 1.24, 5.17],
    ['8', 0.778, 3.24],
    ['6', 0.491, 2.05],
    ['4', 0.308, 1.28],
  ];
  for (const [size, volts, percent] of cases) {
    it(`24 V, 10 A, 50 ft of ${size} AWG stranded: ${volts} V (${percent} %)`, () => {
      const drop = twoWireVoltageDrop({
        oneWayMetres: feetToMetres(50),
        amps: 10,
        size,
        systemVolts: 24,
      });
      expect(Math.abs((drop?.volts ?? 0) - volts)).toBeLessThanOrEqual(0.001);
      expect(Math.abs((drop?.percent ?? 0) - percent)).toBeLessThanOrEqual(0.01);
    });
  }
  it('uses the solid column when asked, and refuses a size that column does not have', () => {
    const solid = twoWireVoltageDrop({
      oneWayMetres: feetToMetres(50),
      amps: 10,
      size: '10',
      stranding: 'solid',
      systemVolts: 24,
    });
    expect(Math.abs((solid?.volts ?? 0) - 1.21)).toBeLessThanOrEqual(0.001);
    expect(
      twoWireVoltageDrop({
        oneWayMetres: 10,
        amps: 10,
        size: '6',
        stranding: 'solid',
        systemVolts: 24,
      }),
    ).toBeNull();
  });
  it('warns above 3 % by default, and the limit is a setting', () => {
    // source: NEC 210.19(A) Informational Note No. 4; default warning at 3 %, configurable
    const run = { oneWayMetres: feetToMetres(50), amps: 10, systemVolts: 24 } as const;
    expect(twoWireVoltageDrop({ ...run, size: '8' })?.overLimit).toBe(true);
    expect(twoWireVoltageDrop({ ...run, size: '6' })?.overLimit).toBe(false);
    expect(twoWireVoltageDrop({ ...run, size: '8', limitPercent: 5 })?.overLimit).toBe(false);
  });
});
