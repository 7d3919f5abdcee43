import { EventEmitter2 } from '@nestjs/event-emitter';
import { useTestDatabase } from '@wellkept/db/testing';
import { sql } from 'kysely';
import { describe, expect, it } from 'vitest';
import { GatewaysRepository } from '../../src/gateways/gateways.repository.js';
import { createLogger } from '../../src/logging/logger.js';
import { SiteUpdates } from '../../src/site-updates/site-updates.js';
import { LatestValuesService } from '../../src/telemetry/latest-values.service.js';
import { seedSite, testConfig } from '../support/ingest-harness.js';

const database = useTestDatabase('ingest_fleet_sized_writes');

/**
 * The writes every few seconds whose size grows with the fleet go out in slices (a whole fleet's
 * parameters in one statement held the event loop for hundreds of milliseconds): every item of
 * every slice must land, and newer stored values must still win.
 */
describe('fleet-sized periodic writes', () => {
  it('writes the latest values of 9,100 channels (more than two statements of them), never moving a channel back', async () => {
    const site = await seedSite(database.db);
    const { rows: channels } = await sql<{ id: number }>`
      insert into channels (site_id, name, unit, value_kind)
      select ${site.siteId}::uuid, 'load/c' || i, 'W', 'number' from generate_series(1, 9100) i
      returning id`.execute(database.db);
    const ids = channels.map((c) => c.id).sort((a, b) => a - b);
    // A newer value already stored on every tenth channel (another node wrote it first).
    const newer = ids.filter((_, i) => i % 10 === 0);
    await sql`update channels set last_time = to_timestamp(2000000000), last_value = -1
              where id = any(${newer}::int[])`.execute(database.db);

    const latest = new LatestValuesService(
      database.db,
      testConfig(database.url),
      createLogger('silent'),
    );
    const t = 1_800_000_000.25;
    for (const [i, id] of ids.entries()) latest.note(id, t, i + 0.5, null);
    await latest.flush();

    const { rows } = await sql<{ id: number; t: number; v: number }>`
      select id, extract(epoch from last_time)::float8 as t, last_value as v
      from channels where site_id = ${site.siteId} order by id`.execute(database.db);
    expect(rows).toHaveLength(ids.length);
    for (const [i, row] of rows.entries()) {
      if (i % 10 === 0) expect(row).toEqual({ id: ids[i], t: 2_000_000_000, v: -1 });
      else expect(row).toEqual({ id: ids[i], t, v: i + 0.5 });
    }
  });

  it('moves last-seen forward for 11,000 gateways (more than two statements of them), never back', async () => {
    const site = await seedSite(database.db);
    const prefix = `fleet-${site.siteId.slice(0, 8)}`;
    await sql`
      insert into gateways (id, site_id, secret_hash, last_seen_at)
      select ${prefix} || '-' || i, ${site.siteId}::uuid, 'not-a-hash',
             case when i % 7 = 0 then timestamptz '2030-01-01' end
      from generate_series(1, 11000) i`.execute(database.db);
    const gateways = new GatewaysRepository(database.db, new SiteUpdates(new EventEmitter2()));
    const at = Date.parse('2026-12-03T20:00:00.123Z');
    const seen = new Map<string, number>();
    for (let i = 1; i <= 11000; i++) seen.set(`${prefix}-${i}`, at + i);
    await gateways.touchLastSeen(seen);

    const { rows } = await sql<{ id: string; seen: Date }>`
      select id, last_seen_at as seen from gateways where id like ${`${prefix}-%`}`.execute(
      database.db,
    );
    expect(rows).toHaveLength(11000);
    for (const row of rows) {
      const i = Number(row.id.slice(prefix.length + 1));
      const expected = i % 7 === 0 ? Date.parse('2030-01-01T00:00:00Z') : at + i;
      expect(row.seen.getTime(), row.id).toBe(expected);
    }
  });
});
