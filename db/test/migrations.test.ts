import { randomUUID } from 'node:crypto';
import { sql } from 'kysely';
import { describe, expect, it } from 'vitest';
import { createDb } from '../src/database.js';
import { migrations } from '../src/migrations/index.js';
import { migrateDown, migrateToLatest, migrateToNothing } from '../src/migrate.js';
import { ensureTimePartitions } from '../src/partitions.js';
import { useTestDatabase } from '../src/testing.js';

const test = useTestDatabase('migr');

async function tableNames(url: string): Promise<string[]> {
  const db = createDb(url, { max: 1 });
  try {
    const { rows } = await sql<{ name: string }>`
      select tablename as name from pg_tables where schemaname = 'public' and tablename not like 'kysely_%'
      order by 1`.execute(db);
    return rows.map((r) => r.name);
  } finally {
    await db.destroy();
  }
}

describe('migrations', () => {
  it('the template database is at the latest migration', async () => {
    const { rows } = await sql<{
      name: string;
    }>`select name from kysely_migration order by name`.execute(test.db);
    expect(rows.map((r) => r.name)).toEqual(Object.keys(migrations).sort());
  });

  it('run all the way down to an empty schema and back up again', async () => {
    const before = await tableNames(test.url);
    expect(before).toContain('readings');
    expect(before).toContain('alerts');

    const reverted = await migrateToNothing(test.db);
    expect(reverted.sort()).toEqual(Object.keys(migrations).sort());
    expect(await tableNames(test.url)).toEqual([]);

    const applied = await migrateToLatest(test.db);
    expect(applied).toEqual(Object.keys(migrations).sort());
    expect(await tableNames(test.url)).toEqual(before);
  });

  it('reverting the latest migration one step and re-applying it is clean', async () => {
    const latest = Object.keys(migrations).sort().at(-1);
    expect(await migrateDown(test.db)).toEqual([latest]);
    expect(await migrateToLatest(test.db)).toEqual([latest]);
  });

  it('fills ten-minute buckets from the minute buckets already stored, under a covering key', async () => {
    const siteId = randomUUID();
    const at = (hhmmss: string) => new Date(`2025-03-01T${hhmmss}Z`);
    await ensureTimePartitions(test.db, 'minute_buckets', at('00:00:00'), at('23:59:59'));
    // Two minutes in 10:10-10:20 (UTC) and one in 10:20-10:30, of one voltage channel.
    await sql`
      insert into minute_buckets (site_id, channel_id, bucket_start, sample_count, sum, min, max,
                                  first_value, first_time, last_value, last_time)
      values (${siteId}, 1, ${at('10:10:00')}, 2, 50, 24.5, 25.5, 24.5, ${at('10:10:00')}, 25.5, ${at('10:10:30')}),
             (${siteId}, 1, ${at('10:19:00')}, 3, 78, 25.5, 26.5, 26.5, ${at('10:19:00')}, 25.5, ${at('10:19:40')}),
             (${siteId}, 1, ${at('10:20:00')}, 1, 27, 27, 27, 27, ${at('10:20:05')}, 27, ${at('10:20:05')})`.execute(
      test.db,
    );
    const tenMinuteBuckets = migrations['20261202_1500_ten_minute_buckets']!;
    await tenMinuteBuckets.down!(test.db);
    await tenMinuteBuckets.up(test.db);

    const { rows } = await sql`
      select bucket_start, sample_count, sum, min, max, first_value, first_time, last_value,
             last_time, on_seconds, starts
        from ten_minute_buckets where site_id = ${siteId} order by bucket_start`.execute(test.db);
    expect(rows).toEqual([
      {
        bucket_start: at('10:10:00'),
        sample_count: 5,
        sum: 128,
        min: 24.5,
        max: 26.5,
        first_value: 24.5,
        first_time: at('10:10:00'),
        last_value: 25.5,
        last_time: at('10:19:40'),
        on_seconds: null,
        starts: null,
      },
      {
        bucket_start: at('10:20:00'),
        sample_count: 1,
        sum: 27,
        min: 27,
        max: 27,
        first_value: 27,
        first_time: at('10:20:05'),
        last_value: 27,
        last_time: at('10:20:05'),
        on_seconds: null,
        starts: null,
      },
    ]);
    // A chart reads these columns from the key alone (index-only scan), like the hour buckets.
    const { rows: keys } = await sql<{ def: string }>`
      select pg_get_indexdef(indexrelid) as def from pg_index
       where indrelid = 'ten_minute_buckets'::regclass and indisprimary`.execute(test.db);
    expect(keys.map((k) => k.def)).toEqual([
      expect.stringContaining(
        '(site_id, channel_id, bucket_start) INCLUDE (sample_count, sum, min, max)',
      ),
    ]);
  });

  it('leaves room on the pages of channels and gateways, whose last values are rewritten all the time', async () => {
    const options = async () => {
      const { rows } = await sql<{ name: string; options: string[] | null }>`
        select relname as name, reloptions as options from pg_class
         where relname in ('channels', 'gateways') order by 1`.execute(test.db);
      return rows;
    };
    expect(await options()).toEqual([
      { name: 'channels', options: ['fillfactor=50'] },
      { name: 'gateways', options: ['fillfactor=50'] },
    ]);
    // Reverting it restores PostgreSQL's full pages.
    const name = '20261203_1550_room_to_update_in_place';
    await migrations[name]!.down!(test.db);
    expect(await options()).toEqual([
      { name: 'channels', options: null },
      { name: 'gateways', options: null },
    ]);
    await migrations[name]!.up(test.db);
    expect((await options()).map((o) => o.options)).toEqual([['fillfactor=50'], ['fillfactor=50']]);
  });
});
