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

let sites: { gatewayId: string; siteId: string }[] = [];

/** Readings of one battery channel at a site, written through the batch path. */
async function write(
  site: { gatewayId: string; siteId: string },
  name: 'battery/voltage' | 'battery/current',
  at: number[],
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
        // The value says where it came from: the time, plus .25 at the first site, .75 at the other.
        value: t + (site === sites[0] ? 0.25 : 0.75),
        unit: name === 'battery/voltage' ? ('V' as const) : ('A' as const),
      })),
      rejects: [],
    },
  ]);
}
describe('samples for pump-run derivation', () => {
  it('gives each asked (site, channel) its own samples from its own time on, in time order', async () => {
    sites = [await seedSite(database.db), await seedSite(database.db)];
    const t0 = Math.floor(Date.now() / 1000) - 3600;
    const times = [t0 + 300, t0, t0 + 600, t0 + 900];
    for (const site of sites) {
      await write(site, 'battery/voltage', times);
      await write(site, 'battery/current', times);
    }
    const [a, b] = sites as [(typeof sites)[0], (typeof sites)[0]];
    const samples = await ingest.app.get(PumpRunsRepository).samples([
      { siteId: a.siteId, name: 'battery/voltage', from: new Date((t0 + 300) * 1000) },
      { siteId: b.siteId, name: 'battery/voltage', from: new Date((t0 + 600) * 1000) },
      { siteId: a.siteId, name: 'battery/current', from: new Date(t0 * 1000) },
      { siteId: b.siteId, name: 'tank/main/level', from: new Date(t0 * 1000) },
    ]);
    const values = (siteId: string, name: string) =>
      samples.get(`${siteId}\u0000${name}`)?.map((s) => [s.t, s.v]);
    expect(values(a.siteId, 'battery/voltage')).toEqual([
      [t0 + 300, t0 + 300.25],
      [t0 + 600, t0 + 600.25],
      [t0 + 900, t0 + 900.25],
    ]);
    expect(values(b.siteId, 'battery/voltage')).toEqual([
      [t0 + 600, t0 + 600.75],
      [t0 + 900, t0 + 900.75],
    ]);
    expect(values(a.siteId, 'battery/current')).toEqual(
      [t0, t0 + 300, t0 + 600, t0 + 900].map((t) => [t, t + 0.25]),
    );
    // Not asked for: site b's current. Asked for but never reported: its tank level.
    expect(values(b.siteId, 'battery/current')).toBeUndefined();
    expect(values(b.siteId, 'tank/main/level')).toBeUndefined();
  });
});
