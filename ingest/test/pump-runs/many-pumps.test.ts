import { useTestDatabase } from '@wellkept/db/testing';
import type { MqttClient } from 'mqtt';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { PumpRunsRepository } from '../../src/pump-runs/pump-runs.repository.js';
import {
  baseName,
  connectGateway,
  publishAcked,
  seedSite,
  startTestIngest,
  type RunningIngest,
  type SeededSite,
} from '../support/ingest-harness.js';
import { runsFromEverySample } from './support/runs-from-every-sample.js';

const database = useTestDatabase('ingest_many_pumps');
let ingest: RunningIngest;

const nowT = Math.floor(Date.now() / 1000 / 60) * 60;
/** Two hours of samples every 30 s, ending five minutes ago. */
const times = Array.from({ length: 240 }, (_, i) => nowT - 300 - 7200 + 30 * i);

interface Pump {
  site: SeededSite;
  key: string;
  ratedCurrentA: number;
  /** On or off at the i-th sample. */
  on: (i: number) => boolean;
}
let pumps: Pump[];
const clients: MqttClient[] = [];

beforeAll(async () => {
  ingest = await startTestIngest(database.url);
  const [a, b, c] = [
    await seedSite(database.db),
    await seedSite(database.db),
    await seedSite(database.db),
  ];
  // Site a also has a booster pump, with no switch channel: on when it draws current.
  await database.db
    .insertInto('pumps')
    .values({
      site_id: a!.siteId,
      key: 'booster',
      name: 'Booster pump',
      kind: 'booster',
      supply: 'battery',
      rated_current_a: 4,
    })
    .execute();
  pumps = [
    { site: a!, key: 'well', ratedCurrentA: 8, on: (i) => i >= 20 },
    { site: a!, key: 'booster', ratedCurrentA: 4, on: (i) => i % 6 < 2 },
    { site: b!, key: 'well', ratedCurrentA: 8, on: (i) => i >= 100 && i < 180 },
    { site: c!, key: 'well', ratedCurrentA: 8, on: (i) => i % 40 >= 25 },
  ];
  await ingest.sweep(); // starts the watermark at "now": everything below arrives late
  for (const site of [a!, b!, c!]) {
    const client = await connectGateway(ingest.mqttUrl, site);
    clients.push(client);
    const own = pumps.filter((p) => p.site === site);
    for (let k = 0; k < times.length; k += 40) {
      const records = times.slice(k, k + 40).flatMap((t, j) => {
        const i = k + j;
        return [
          { n: 'battery/voltage', u: 'V', t, v: 24 + (i % 9) / 10 },
          ...own.flatMap((p) => [
            ...(p.key === 'well' ? [{ n: `pump/${p.key}/running`, t, vb: p.on(i) }] : []),
            {
              n: `pump/${p.key}/current`,
              u: 'A',
              t,
              v: p.on(i) ? p.ratedCurrentA - (i % 3) / 10 : 0.05,
            },
          ]),
        ];
      });
      await publishAcked(
        client,
        `gateways/${site.gatewayId}/senml`,
        JSON.stringify([{ bn: baseName(site.gatewayId) }, ...records]),
      );
    }
  }
});

afterAll(async () => {
  for (const client of clients) client.end(true);
  await ingest?.close();
});

describe('re-deriving the runs of several pumps in one sweep', () => {
  it('reads them together and stores for each pump the runs of its own samples', async () => {
    const samples = vi.spyOn(ingest.app.get(PumpRunsRepository), 'samples');
    try {
      await ingest.sweep();
      // Four pumps' two hours each: one read for all of them.
      expect(samples).toHaveBeenCalledTimes(1);
    } finally {
      samples.mockRestore();
    }
    for (const pump of pumps) {
      const stored = await database.db
        .selectFrom('pump_runs as r')
        .innerJoin('pumps as p', 'p.id', 'r.pump_id')
        .select([
          'r.started_at',
          'r.ended_at',
          'r.mean_current_a',
          'r.energy_wh',
          'r.spans_gap',
          'r.open_run_carry',
        ])
        .where('p.site_id', '=', pump.site.siteId)
        .where('p.key', '=', pump.key)
        .orderBy('r.started_at')
        .execute();
      const expected = await runsFromEverySample(database.db, {
        siteId: pump.site.siteId,
        key: pump.key,
        ratedCurrentA: pump.ratedCurrentA,
      });
      expect(expected.length).toBeGreaterThan(0);
      expect(stored.map((r) => r.started_at.getTime() / 1000)).toEqual(
        expected.map((r) => r.startedAt),
      );
      stored.forEach((r, i) => {
        const e = expected[i]!;
        expect(r.ended_at === null ? null : r.ended_at.getTime() / 1000).toBe(e.endedAt);
        expect(r.mean_current_a).toBeCloseTo(e.meanCurrentA!, 9);
        if (e.energyWh === null) expect(r.energy_wh).toBeNull();
        else expect(r.energy_wh).toBeCloseTo(e.energyWh, 6);
        expect(r.spans_gap).toBe(e.spansGap);
        // Only a run still open carries its totals on.
        expect(r.open_run_carry === null).toBe(e.endedAt !== null);
      });
    }
  });
});
