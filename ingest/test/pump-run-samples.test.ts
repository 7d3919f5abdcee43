import { useTestDatabase } from '@wellkept/db/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PumpRunsRepository } from '../src/pump-runs/pump-runs.repository.js';
import { TelemetryBatchRepository } from '../src/storage/telemetry-batch.repository.js';
import { seedSite, startTestIngest, type RunningIngest } from './support/ingest-harness.js';

const database = useTestDatabase('ingest_pump_run_samples');
let ingest: RunningIngest;

beforeAll(async () => {
  ingest = await startTestIngest(database.url);
});

afterAll(async () => {
  await ingest?.close();
});

/**
 * Readings of one battery channel at a site, written through the batch path. Each value is its
 * time plus `mark`, so a sample read back says which site it came from.
 */
async function write(
  site: { gatewayId: string; siteId: string },
  name: 'battery/voltage' | 'battery/current',
  at: number[],
  mark: number,
) {
  await ingest.app.get(TelemetryBatchRepository).commit([
    {
      gatewayId: site.gatewayId,
      siteId: site.siteId,
      messageId: 1,
      receivedAt: Date.now(),
      recordCount: at.length,
      readings: at.map((t) => ({
        name,
        pattern: name,
        key: null,
        t,
        valueType: 'number' as const,
        value: t + mark,
        unit: name === 'battery/voltage' ? ('V' as const) : ('A' as const),
      })),
      rejects: [],
    },
  ]);
}

describe('samples for pump-run derivation', () => {
  it('gives each asked (site, channel) its own samples from its own time on (to its own end), in time order, in the order asked', async () => {
    const a = await seedSite(database.db);
    const b = await seedSite(database.db);
    const t0 = Math.floor(Date.now() / 1000) - 3600;
    const times = [t0 + 300, t0, t0 + 600, t0 + 900];
    for (const [site, mark] of [
      [a, 0.25],
      [b, 0.75],
    ] as const) {
      await write(site, 'battery/voltage', times, mark);
      await write(site, 'battery/current', times, mark);
    }
    const samples = await ingest.app.get(PumpRunsRepository).samples([
      { siteId: a.siteId, name: 'battery/voltage', from: new Date((t0 + 300) * 1000) },
      { siteId: b.siteId, name: 'battery/voltage', from: new Date((t0 + 600) * 1000) },
      { siteId: a.siteId, name: 'battery/current', from: new Date(t0 * 1000) },
      { siteId: b.siteId, name: 'tank/main/level', from: new Date(t0 * 1000) },
      {
        siteId: a.siteId,
        name: 'battery/voltage',
        from: new Date(t0 * 1000),
        before: new Date((t0 + 600) * 1000),
      },
    ]);
    const values = (i: number) => samples[i]!.map((s) => [s.t, s.v]);
    expect(samples).toHaveLength(5);
    expect(values(0)).toEqual([
      [t0 + 300, t0 + 300.25],
      [t0 + 600, t0 + 600.25],
      [t0 + 900, t0 + 900.25],
    ]);
    expect(values(1)).toEqual([
      [t0 + 600, t0 + 600.75],
      [t0 + 900, t0 + 900.75],
    ]);
    expect(values(2)).toEqual([t0, t0 + 300, t0 + 600, t0 + 900].map((t) => [t, t + 0.25]));
    // Asked for but never reported: site b's tank level.
    expect(values(3)).toEqual([]);
    // Up to a time: the samples before it only.
    expect(values(4)).toEqual([
      [t0, t0 + 0.25],
      [t0 + 300, t0 + 300.25],
    ]);
  });
});
