import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  CONTROLLER_STAGES,
  MEASUREMENTS,
  type OutgoingReading,
  type TelemetryValidation,
  type PlausibleRange,
  parseMeasurementName,
  plausibleRange,
  serialiseTelemetryPack,
  validateTelemetryPack,
} from '../../src/index.js';

const NOW = 1_717_243_200;
const GATEWAY = 'gw-0042';
const BN = `urn:dev:wellkept:${GATEWAY}:`;

const names = [
  'battery/voltage',
  'battery/current',
  'battery/temperature',
  'pv/roof/voltage',
  'pv/roof/current',
  'pump/well/running',
  'pump/well/current',
  'pump/well/flow',
  'tank/main/level',
  'float/upper/closed',
  'pressure/house',
  'controller/stage',
  'well/level',
];

/** Numbers a hostile or broken gateway might send, including ones JSON cannot carry. */
const anyNumber = fc.oneof(
  fc.double(),
  fc.integer(),
  fc.constantFrom(
    0,
    -0,
    2 ** 28,
    2 ** 28 - 1,
    NOW,
    1e308,
    -1e308,
    Number.NaN,
    Number.POSITIVE_INFINITY,
  ),
  fc.double({ min: -400, max: 400, noNaN: true }),
);
const anyScalar = fc.oneof(anyNumber, fc.string(), fc.boolean(), fc.constant(null));

/** Records that are mostly SenML-shaped, with every field sometimes wrong. */
const senmlishRecord = fc.record(
  {
    bn: fc.oneof(fc.constant(BN), fc.constant('urn:dev:wellkept:other:'), fc.string(), anyScalar),
    bt: fc.oneof(fc.constant(NOW), fc.double({ min: -1e6, max: 1e6, noNaN: true }), anyScalar),
    bu: fc.oneof(fc.constantFrom('V', 'A', 'm', 'Pa'), anyScalar),
    bv: anyScalar,
    bver: fc.oneof(fc.constantFrom(5, 10, 11), anyScalar),
    n: fc.oneof(fc.constantFrom(...names), fc.string(), anyScalar),
    u: fc.oneof(fc.constantFrom('V', 'A', 'Cel', 'm', 'm3/s', 'Pa', 'mV'), anyScalar),
    v: anyScalar,
    vb: fc.oneof(fc.boolean(), anyScalar),
    vs: fc.oneof(fc.constantFrom(...CONTROLLER_STAGES), fc.string(), anyScalar),
    vd: anyScalar,
    s: anyScalar,
    t: fc.oneof(fc.integer({ min: -100_000, max: 1000 }), anyNumber, anyScalar),
    ut: anyScalar,
    x_: anyScalar,
  },
  { requiredKeys: [] },
);

function inRange(range: PlausibleRange | null, fraction: number): number {
  if (!range) return fraction;
  return Math.min(range.max, range.min + fraction * (range.max - range.min));
}

const anyPack = fc.oneof(
  { weight: 6, arbitrary: fc.array(senmlishRecord, { maxLength: 12 }) },
  { weight: 1, arbitrary: fc.jsonValue() },
  { weight: 1, arbitrary: fc.anything() },
  { weight: 1, arbitrary: fc.string() },
  { weight: 1, arbitrary: fc.array(fc.anything(), { maxLength: 5 }) },
);

function checkInvariants(result: TelemetryValidation): void {
  if (result.packError !== null) {
    expect(result.readings).toEqual([]);
    expect(result.packError.length).toBeGreaterThan(0);
    return;
  }
  expect(result.readings.length + result.rejected.length + result.baseOnlyRecords).toBe(
    result.recordCount,
  );
  for (const reading of result.readings) {
    expect(Number.isFinite(reading.t)).toBe(true);
    if (typeof reading.value === 'number') expect(Number.isFinite(reading.value)).toBe(true);
    expect(parseMeasurementName(reading.name)?.pattern).toBe(reading.pattern);
    expect(reading.t).toBeLessThanOrEqual(NOW + 300);
  }
  for (const rejection of result.rejected) {
    expect(typeof rejection.reason).toBe('string');
    expect(rejection.reason.length).toBeGreaterThan(0);
    expect(rejection.reason).not.toMatch(/NaN|undefined|\[object/);
  }
}

describe('telemetry validator properties (fast-check)', () => {
  it('any input either normalises or yields reasons: never throws, never NaN or Infinity', () => {
    // The main property: 10,000 cases (the bar issue 9 sets for the suite).
    fc.assert(
      fc.property(anyPack, fc.boolean(), (pack, asText) => {
        let input: unknown = pack;
        if (asText) {
          try {
            input = JSON.stringify(pack);
          } catch {
            input = pack;
          }
        }
        const result = validateTelemetryPack(input, {
          nowSeconds: NOW,
          gatewayId: GATEWAY,
          batteryNominalVolts: 24,
        });
        checkInvariants(result);
      }),
      { numRuns: 10_000 },
    );
  });

  it('random bytes never throw', () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 300 }), (bytes) => {
        checkInvariants(validateTelemetryPack(bytes, { nowSeconds: NOW }));
      }),
      { numRuns: 1000 },
    );
  });

  const validReading: fc.Arbitrary<OutgoingReading> = fc
    .tuple(
      fc.constantFrom(...MEASUREMENTS.map((m) => m.pattern)),
      fc.integer({ min: -86_400_000, max: 0 }),
      fc.double({ min: 0, max: 1, noNaN: true }),
      fc.boolean(),
      fc.constantFrom(...CONTROLLER_STAGES),
    )
    .map(([pattern, milliseconds, fraction, flag, stage]) => {
      const name = pattern.replace(/<[a-z]+>/, 'k1');
      const spec = MEASUREMENTS.find((m) => m.pattern === pattern);
      const value =
        spec?.valueType === 'boolean'
          ? flag
          : spec?.valueType === 'string'
            ? stage
            : inRange(plausibleRange(pattern, { batteryNominalVolts: 24 }), fraction);
      return { name, t: NOW + milliseconds / 1000, value };
    });

  it('serialise then validate gives the readings back, times within 1 ms', () => {
    fc.assert(
      fc.property(
        fc.uniqueArray(validReading, {
          maxLength: 30,
          selector: (r) => `${r.name}@${Math.round(r.t * 1000)}`,
        }),
        (readings) => {
          const pack = serialiseTelemetryPack(GATEWAY, readings);
          const result = validateTelemetryPack(JSON.stringify(pack), {
            nowSeconds: NOW,
            gatewayId: GATEWAY,
            batteryNominalVolts: 24,
          });
          const millis = (t: number) => Math.round(t * 1000);
          expect(result.rejected).toEqual([]);
          expect(result.readings.length).toBe(readings.length);
          result.readings.forEach((reading, i) => {
            const original = readings[i];
            expect(reading.name).toBe(original?.name);
            expect(millis(reading.t)).toBe(millis(original?.t ?? Number.NaN));
            expect(reading.value).toBe(original?.value);
          });
        },
      ),
      { numRuns: 1000 },
    );
  });
});
