import { CONTROLLER_STAGES, validateTelemetryPack } from '@wellkept/core';
import { useTestDatabase } from '@wellkept/db/testing';
import fc from 'fast-check';
import { sql } from 'kysely';
import type { MqttClient } from 'mqtt';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rejectCategory, storableText } from '../../src/telemetry/reject-reasons.js';
import {
  baseName,
  connectGateway,
  publishAcked,
  seedSite,
  startTestIngest,
  type RunningIngest,
  type SeededSite,
} from '../support/ingest-harness.js';

/**
 * Property-based fuzzing of the SenML path. Most cases go through the validator alone (fast);
 * a few hundred go end to end through the real broker into PostgreSQL, where what is stored and
 * refused must be exactly what the validator says.
 */

const NOW = 1_767_268_800;
const GATEWAY = 'gw-fuzz';
const NAMES = [
  'battery/voltage',
  'battery/current',
  'battery/temperature',
  'pv/roof/voltage',
  'pump/well/running',
  'pump/well/current',
  'pump/well/flow',
  'tank/main/level',
  'float/high/closed',
  'pressure/house',
  'controller/stage',
  'well/level',
];
const UNITS = ['V', 'A', 'Cel', 'm', 'm3/s', 'Pa', 'mV', '', 'cm'];

/** A record that is nearly right: each field usually plausible, sometimes wrong or missing. */
function recordArbitrary(bn: string, t0: number) {
  const oneOf = <T>(usual: fc.Arbitrary<T>, odd: fc.Arbitrary<unknown>) =>
    fc.oneof({ weight: 4, arbitrary: usual }, { weight: 1, arbitrary: odd });
  const oddScalar = fc.oneof(
    fc.string({ maxLength: 12 }),
    fc.constantFrom(null, true, 'NaN', 'Infinity', -0, 1e308, [], {}),
    fc.double(),
  );
  return fc.record(
    {
      bn: oneOf(fc.constant(bn), fc.oneof(fc.constant('urn:dev:wellkept:gw-other:'), oddScalar)),
      bt: oneOf(fc.constant(t0), fc.oneof(fc.integer({ min: -1e9, max: 5e9 }), oddScalar)),
      n: oneOf(fc.constantFrom(...NAMES), fc.oneof(fc.string({ maxLength: 30 }), oddScalar)),
      u: oneOf(fc.constantFrom(...UNITS), oddScalar),
      v: oneOf(fc.double({ min: -3000, max: 3000, noNaN: true }), oddScalar),
      vb: oneOf(fc.boolean(), oddScalar),
      vs: oneOf(fc.constantFrom(...CONTROLLER_STAGES), oddScalar),
      t: oneOf(fc.integer({ min: 0, max: 3000 }), oddScalar),
      ut: oddScalar,
    },
    { requiredKeys: [] },
  );
}

/** Bytes of a JSON pack with some bytes overwritten, cut or inserted (transport damage). */
const damagedBytes = fc
  .tuple(
    fc.array(recordArbitrary(`urn:dev:wellkept:${GATEWAY}:`, NOW - 60), { maxLength: 6 }),
    fc.array(fc.tuple(fc.nat(), fc.integer({ min: 0, max: 255 }), fc.constantFrom(0, 1, 2)), {
      maxLength: 4,
    }),
  )
  .map(([records, edits]) => {
    const bytes = [...Buffer.from(JSON.stringify(records))];
    for (const [at, byte, kind] of edits) {
      const i = bytes.length === 0 ? 0 : at % bytes.length;
      if (kind === 0) bytes[i] = byte;
      else if (kind === 1) bytes.splice(i, 0, byte);
      else bytes.length = i;
    }
    return Buffer.from(bytes);
  });

describe('SenML fuzzing, validator path', () => {
  it('10,000 damaged or odd packs: never throws, every record accounted for, reasons storable', () => {
    const input = fc.oneof(
      { weight: 3, arbitrary: damagedBytes },
      {
        weight: 3,
        arbitrary: fc
          .array(recordArbitrary(`urn:dev:wellkept:${GATEWAY}:`, NOW - 60), { maxLength: 10 })
          .map((records) => JSON.stringify(records)),
      },
      { weight: 1, arbitrary: fc.string({ unit: 'binary', maxLength: 200 }) },
    );
    fc.assert(
      fc.property(input, (payload) => {
        const result = validateTelemetryPack(payload, {
          nowSeconds: NOW,
          gatewayId: GATEWAY,
          batteryNominalVolts: 24,
        });
        if (result.packError !== null) {
          expect(result.readings).toEqual([]);
          expect(result.packError).toMatch(/^(pack|record \d+|SenML version)/);
          expect(rejectCategory(result.packError)).toBe('pack');
        } else {
          expect(result.readings.length + result.rejected.length + result.baseOnlyRecords).toBe(
            result.recordCount,
          );
          const indexes = result.rejected.map((r) => r.index);
          expect(new Set(indexes).size).toBe(indexes.length);
          for (const r of result.rejected) {
            expect(r.index).toBeGreaterThanOrEqual(0);
            expect(r.index).toBeLessThan(result.recordCount);
            expect(r.reason.length).toBeGreaterThan(5);
            expect(storableText(r.reason)).not.toContain('\u0000');
            expect(r.reason).not.toContain('[object Object]');
          }
          for (const reading of result.readings) {
            expect(Number.isFinite(reading.t)).toBe(true);
            expect(reading.t).toBeLessThanOrEqual(NOW + 300);
            expect(reading.t).toBeGreaterThanOrEqual(NOW - 30 * 86_400);
            if (typeof reading.value === 'number')
              expect(Number.isFinite(reading.value)).toBe(true);
          }
        }
      }),
      { numRuns: 10_000 },
    );
  });
});

const database = useTestDatabase('ingest_senml_fuzz');
let ingest: RunningIngest;
let site: SeededSite;
let client: MqttClient;

describe('SenML fuzzing, end to end through the broker', () => {
  beforeAll(async () => {
    ingest = await startTestIngest(database.url, { maxPacketBytes: 256 * 1024 });
    site = await seedSite(database.db);
    client = await connectGateway(ingest.mqttUrl, site);
  });
  afterAll(async () => {
    client?.end(true);
    await ingest?.close();
  });

  async function counts(): Promise<{ readings: number; rejects: number }> {
    const { rows } = await sql<{ readings: number; rejects: number }>`
      select (select count(*)::int from readings where site_id = ${site.siteId}) as readings,
             (select count(*)::int from ingest_rejects where gateway_id = ${site.gatewayId}) as rejects
    `.execute(database.db);
    return rows[0]!;
  }

  it('200 random packs: the database holds exactly what the validator accepts and refuses', async () => {
    let run = 0;
    await fc.assert(
      fc.asyncProperty(
        fc.integer({ min: 0, max: 1_000_000 }),
        fc.array(fc.integer({ min: 0, max: 2 ** 31 - 1 }), { minLength: 0, maxLength: 12 }),
        async (seed, picks) => {
          run += 1;
          // Each run has an hour of its own, so no two runs write the same (name, time).
          const now = Math.floor(Date.now() / 1000);
          const t0 = now - run * 3600;
          const records = fc.sample(recordArbitrary(baseName(site.gatewayId), t0), {
            seed,
            numRuns: picks.length,
          });
          const payload = JSON.stringify(records);
          const before = await counts();
          const expected = validateTelemetryPack(payload, {
            nowSeconds: Date.now() / 1000,
            gatewayId: site.gatewayId,
            batteryNominalVolts: 24,
            limits: { maxPackBytes: 256 * 1024 },
          });
          await publishAcked(client, `gateways/${site.gatewayId}/senml`, payload);
          const after = await counts();
          expect(after.readings - before.readings).toBe(expected.readings.length);
          expect(after.rejects - before.rejects).toBe(
            expected.packError !== null ? 1 : expected.rejected.length,
          );
        },
      ),
      { numRuns: 200 },
    );
  });
});
