import { useTestDatabase } from '@wellkept/db/testing';
import { ensureTimePartitions } from '@wellkept/db';
import { sql } from 'kysely';
import { describe, expect, it } from 'vitest';
import { BucketsRepository } from '../../src/storage/buckets.repository.js';
import { seedSite } from '../support/ingest-harness.js';

const database = useTestDatabase('ingest_rollup_time_index');

describe('the roll-up sweep reads only the minutes it rolls up', () => {
  it('finds the last minutes of a big partition by the time index, without reading it all', async () => {
    const site = await seedSite(database.db);
    const channels = await database.db
      .insertInto('channels')
      .values(
        Array.from({ length: 10 }, (_, i) => ({
          site_id: site.siteId,
          name: `tank/t${i}/level`,
          unit: 'm',
          value_kind: 'number' as const,
        })),
      )
      .returning('id')
      .execute();
    // Ten hours of one reading a second on ten channels, in time order as gateways send them:
    // 360,000 rows in today's partition (the sweep's time range has no site to narrow it).
    const end = new Date(Math.floor(Date.now() / 60_000) * 60_000 - 5 * 60_000);
    const start = new Date(end.getTime() - 10 * 3600_000);
    await ensureTimePartitions(database.db, 'readings', start, end);
    await ensureTimePartitions(database.db, 'minute_buckets', start, end);
    await sql`
      insert into readings (site_id, channel_id, time, value)
      select ${site.siteId}::uuid, c, t, 1.5
        from generate_series(${start}::timestamptz, ${end}::timestamptz - interval '1 second', interval '1 second') t
       cross join unnest(${channels.map((c) => c.id)}::int[]) c
       order by t`.execute(database.db);
    // As autovacuum would by then: VACUUM summarises the block ranges of the time index.
    await sql`vacuum analyze readings`.execute(database.db);

    const scans = await database.db.transaction().execute(async (trx) => {
      // Scan counts this backend has not reported yet (pg_stat_xact_*: no stats flush to wait
      // for), before and after the roll-up.
      const counts = async () => {
        const { rows } = await sql<{ seq: number; idx: number; read: number }>`
          select coalesce(sum(seq_scan), 0)::int as seq, coalesce(sum(idx_scan), 0)::int as idx,
                 coalesce(sum(idx_tup_fetch + seq_tup_read), 0)::int as read
            from pg_stat_xact_user_tables where relname like 'readings_p%'`.execute(trx);
        return rows[0]!;
      };
      const before = await counts();
      const written = await new BucketsRepository().rollUpMinutes(
        trx,
        new Date(end.getTime() - 60_000),
        end,
      );
      expect(written).toBe(10); // one minute bucket per channel
      const after = await counts();
      return {
        seq: after.seq - before.seq,
        idx: after.idx - before.idx,
        read: after.read - before.read,
      };
    });
    expect(scans.seq).toBe(0);
    expect(scans.idx).toBeGreaterThan(0);
    // The minute plus the 10 minutes before it that switch on-times look back over, in whole
    // block ranges: far below the 360,000 rows of the partition.
    expect(scans.read).toBeLessThan(30_000);
  });
});
