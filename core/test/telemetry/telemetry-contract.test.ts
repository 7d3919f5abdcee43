import { describe, expect, it } from 'vitest';
import {
  MEASUREMENTS,
  measurementName,
  parseMeasurementName,
  serialiseTelemetryPack,
  serialiseTelemetryPackJson,
  validateTelemetryPack,
} from '../../src/index.js';

const NOW = 1_717_243_200; // 2024-06-01T12:00:00Z
const BN = 'urn:dev:wellkept:gw-0042:';

describe('measurement names', () => {
  it('the table holds every name of the contract with its SI unit and value kind', () => {
    // source: ../shared/product.md, "Telemetry contract"
    expect(MEASUREMENTS.map((m) => [m.pattern, m.unit ?? m.valueType])).toEqual([
      ['battery/voltage', 'V'],
      ['battery/current', 'A'],
      ['battery/temperature', 'Cel'],
      ['pv/<array>/voltage', 'V'],
      ['pv/<array>/current', 'A'],
      ['pump/<pump>/running', 'boolean'],
      ['pump/<pump>/current', 'A'],
      ['pump/<pump>/flow', 'm3/s'],
      ['tank/<tank>/level', 'm'],
      ['float/<switch>/closed', 'boolean'],
      ['pressure/<point>', 'Pa'],
      ['controller/stage', 'string'],
      ['well/level', 'm'],
    ]);
  });

  it('parses and builds names with equipment keys', () => {
    expect(parseMeasurementName('pump/well/current')).toEqual({
      pattern: 'pump/<pump>/current',
      key: 'well',
    });
    expect(parseMeasurementName('pressure/house')).toEqual({
      pattern: 'pressure/<point>',
      key: 'house',
    });
    expect(parseMeasurementName('battery/voltage')).toEqual({
      pattern: 'battery/voltage',
      key: null,
    });
    expect(parseMeasurementName('pump/well/speed')).toBeNull();
    expect(parseMeasurementName('pump//current')).toBeNull();
    expect(parseMeasurementName('battery/voltage/extra')).toBeNull();
    expect(measurementName('float/<switch>/closed', 'upper')).toBe('float/upper/closed');
    expect(() => measurementName('tank/<tank>/level')).toThrow(RangeError);
  });
});

describe('validateTelemetryPack', () => {
  it('accepts a typical pack and normalises every record to absolute time', () => {
    const pack = [
      { bn: BN, bt: NOW, n: 'battery/voltage', u: 'V', v: 25.4 },
      { n: 'battery/current', u: 'A', v: -3.2, t: -60 },
      { n: 'battery/temperature', u: 'Cel', v: 18 },
      { n: 'pv/roof/voltage', u: 'V', v: 61.2 },
      { n: 'pump/well/running', vb: true },
      { n: 'pump/well/flow', u: 'm3/s', v: 0.0005 },
      { n: 'tank/main/level', u: 'm', v: 1.42 },
      { n: 'float/upper/closed', vb: false },
      { n: 'pressure/house', u: 'Pa', v: 310_000 },
      { n: 'controller/stage', vs: 'absorption' },
      { n: 'well/level', u: 'm', v: 38.5 },
    ];
    const result = validateTelemetryPack(JSON.stringify(pack), {
      nowSeconds: NOW,
      gatewayId: 'gw-0042',
      batteryNominalVolts: 24,
    });
    expect(result.packError).toBeNull();
    expect(result.rejected).toEqual([]);
    expect(result.readings).toHaveLength(11);
    expect(result.readings[1]).toEqual({
      name: 'battery/current',
      pattern: 'battery/current',
      key: null,
      t: NOW - 60,
      valueType: 'number',
      value: -3.2,
      unit: 'A',
    });
    expect(result.readings[4]).toMatchObject({ key: 'well', value: true, unit: null });
    expect(result.readings[9]).toMatchObject({ pattern: 'controller/stage', value: 'absorption' });
  });

  it('keeps the good records of a pack and gives a readable reason for each bad one', () => {
    const pack = [
      { bn: BN, bt: NOW, n: 'battery/voltage', u: 'V', v: 912 },
      { n: 'battery/voltage', u: 'V', v: 25.1, t: -10 },
      { n: 'battery/voltage', u: 'mV', v: 25100, t: -20 },
      { n: 'battery/current', v: 2 },
      { n: 'pump/well/running', v: 1 },
      { n: 'controller/stage', vs: 'resting' },
      { n: 'tank/main/volume', u: 'm3', v: 1 },
      { bt: Date.UTC(2031, 0, 1) / 1000, n: 'battery/voltage', u: 'V', v: 25 },
    ];
    const result = validateTelemetryPack(pack, { nowSeconds: NOW, batteryNominalVolts: 24 });
    expect(result.readings.map((r) => r.value)).toEqual([25.1]);
    expect(result.rejected.map((r) => r.reason)).toEqual([
      'battery/voltage: value 912 V outside 0–40 V for a 24 V bank',
      'battery/voltage: unit "mV" is not the expected V',
      'battery/current: unit missing, expected A',
      'pump/well/running: needs true or false (vb), got a number (v)',
      'controller/stage: "resting" is not a stage (bulk, absorption, float, equalize, off)',
      'tank/main/volume: not a Wellkept measurement name',
      'battery/voltage: time 2031-01-01T00:00:00Z is more than 5 minutes in the future',
    ]);
    expect(result.rejected.map((r) => r.index)).toEqual([0, 2, 3, 4, 5, 6, 7]);
  });

  it('refuses records of another gateway and names outside the Wellkept base name', () => {
    const pack = [
      { bn: 'urn:dev:wellkept:gw-0007:', n: 'battery/voltage', u: 'V', v: 12.6 },
      { bn: 'urn:dev:ow:10e2073a01080063:', n: 'voltage', u: 'V', v: 120.1 },
    ];
    const result = validateTelemetryPack(pack, { nowSeconds: NOW, gatewayId: 'gw-0042' });
    expect(result.readings).toEqual([]);
    expect(result.rejected.map((r) => r.reason)).toEqual([
      'battery/voltage: belongs to gateway gw-0007, not gw-0042',
      'name "urn:dev:ow:10e2073a01080063:voltage" does not start with urn:dev:wellkept:<gateway-id>:',
    ]);
  });

  it('refuses readings older than the store-and-forward window and repeated readings', () => {
    const pack = [
      { bn: BN, bt: NOW, n: 'tank/main/level', u: 'm', v: 1 },
      { n: 'tank/main/level', u: 'm', v: 1.1 },
      { n: 'tank/main/level', u: 'm', v: 1.2, t: -31 * 86_400 },
    ];
    const result = validateTelemetryPack(pack, { nowSeconds: NOW });
    expect(result.gatewayId).toBe('gw-0042');
    expect(result.readings).toHaveLength(1);
    expect(result.rejected.map((r) => r.reason)).toEqual([
      'tank/main/level: repeats record 1 (same name and time)',
      'tank/main/level: time 2024-05-01T12:00:00Z is more than 30 days in the past',
    ]);
  });

  it('enforces size and count limits at pack level', () => {
    const many = Array.from({ length: 11 }, (_, i) => ({
      bn: BN,
      n: 'battery/voltage',
      u: 'V',
      v: 12,
      t: -i,
    }));
    expect(
      validateTelemetryPack(many, { nowSeconds: NOW, limits: { maxRecords: 10 } }).packError,
    ).toBe('pack has 11 records, more than the limit of 10');
    const text = JSON.stringify(many);
    expect(
      validateTelemetryPack(text, { nowSeconds: NOW, limits: { maxPackBytes: 100 } }).packError,
    ).toBe(`pack is ${text.length} bytes, more than the limit of 100`);
    const long = [{ bn: BN, n: 'controller/stage', vs: 'x'.repeat(65) }];
    expect(validateTelemetryPack(long, { nowSeconds: NOW }).rejected[0]?.reason).toBe(
      'vs is 65 characters, more than 64',
    );
  });

  it('reads UTF-8 bytes as sent over MQTT, and says so when the text is not JSON', () => {
    const bytes = new TextEncoder().encode(
      JSON.stringify([{ bn: BN, n: 'battery/voltage', u: 'V', v: 12.7 }]),
    );
    expect(validateTelemetryPack(bytes, { nowSeconds: NOW }).readings).toHaveLength(1);
    expect(validateTelemetryPack('{"bn":', { nowSeconds: NOW }).packError).toBe(
      'pack is not valid JSON',
    );
    expect(validateTelemetryPack({ bn: BN }, { nowSeconds: NOW }).packError).toBe(
      'pack is not a JSON array of records',
    );
    expect(validateTelemetryPack(new Uint8Array([0xff, 0xfe]), { nowSeconds: NOW }).packError).toBe(
      'pack is not valid UTF-8 text',
    );
  });
});

describe('serialiseTelemetryPack', () => {
  it('writes a compact pack: bn and bt once, the common unit as bu, relative t', () => {
    const pack = serialiseTelemetryPack('gw-0042', [
      { name: 'battery/voltage', t: NOW - 60, value: 25.3 },
      { name: 'battery/voltage', t: NOW, value: 25.2 },
      { name: 'pump/well/running', t: NOW, value: true },
      { name: 'tank/main/level', t: NOW, value: 1.5 },
    ]);
    expect(pack).toEqual([
      { bn: BN, bt: NOW, bu: 'V', n: 'battery/voltage', v: 25.3, t: -60 },
      { n: 'battery/voltage', v: 25.2 },
      { n: 'pump/well/running', vb: true },
      { n: 'tank/main/level', u: 'm', v: 1.5 },
    ]);
  });

  it('round-trips through the validator', () => {
    const readings = [
      { name: 'battery/current', t: NOW - 120.25, value: -4.5 },
      { name: 'controller/stage', t: NOW - 100, value: 'float' },
      { name: 'pressure/house', t: NOW - 1, value: 275_000 },
    ];
    const result = validateTelemetryPack(serialiseTelemetryPackJson('gw-0042', readings), {
      nowSeconds: NOW,
      gatewayId: 'gw-0042',
    });
    expect(result.rejected).toEqual([]);
    expect(result.readings.map((r) => [r.name, r.t, r.value])).toEqual(
      readings.map((r) => [r.name, r.t, r.value]),
    );
  });

  it('refuses an invalid gateway id or a non-finite reading', () => {
    expect(() => serialiseTelemetryPack('bad id', [])).toThrow(RangeError);
    expect(() =>
      serialiseTelemetryPack('gw-1', [{ name: 'battery/voltage', t: NOW, value: Number.NaN }]),
    ).toThrow(RangeError);
  });
});
