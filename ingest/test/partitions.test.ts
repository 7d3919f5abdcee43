import { ensureTimePartitions } from '@wellkept/db';
import { useTestDatabase } from '@wellkept/db/testing';
import { sql } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readIngestConfig } from '../src/config/ingest-config.js';
import { PartitionsService } from '../src/storage/partitions.service.js';
import { TelemetryBatchRepository } from '../src/storage/telemetry-batch.repository.js';
import { BucketsRepository } from '../src/storage/buckets.repository.js';
import {
  readingsOf,
  seedSite,
  startTestIngest,
  type RunningIngest,
} from './support/ingest-harness.js';

const database = useTestDatabase('ingest_partitions');
let ingest: RunningIngest;

beforeAll(async () => {
  ingest = await startTestIngest(database.url);
});

afterAll(async () => {
  await ingest?.close();
});

/** The partition's name when it exists, else null. */
async function partitionNamed(name: string): Promise<string | null | undefined> {
  const { rows } = await sql<{ r: string | null }>`select to_regclass(${name})::text as r`.execute(
    database.db,
  );
  return rows[0]?.r;
}

/**
 * A site with a battery-voltage channel and raw readings `secondsAfter` the given minute, its
 * day's raw partition made for them, as the API's CSV import writes history.
 */
async function siteWithReadings(
  minute: Date,
  readings: [secondsAfter: number, value: number][],
): Promise<string> {
  const { siteId } = await seedSite(database.db);
  const { rows } = await sql<{ id: number }>`
    insert into channels (site_id, name, unit, value_kind)
    values (${siteId}, 'battery/voltage', 'V', 'number') returning id`.execute(database.db);
  await ensureTimePartitions(database.db, 'readings', minute, new Date(minute.getTime() + 60_000));
  for (const [secondsAfter, value] of readings) {
    await sql`
      insert into readings (site_id, channel_id, time, value)
      values (${siteId}, ${rows[0]!.id}, ${new Date(minute.getTime() + secondsAfter * 1000)},
              ${value})`.execute(database.db);
  }
  return siteId;
}

describe('time partitions', () => {
  it('creates partitions ahead of now and 31 days back at start-up', async () => {
    const { rows } = await sql<{ name: string }>`
      select c.relname as name from pg_inherits i join pg_class c on c.oid = i.inhrelid
      where i.inhparent = 'readings'::regclass`.execute(database.db);
    const day = (offset: number) =>
      `readings_p${new Date(Date.now() + offset * 86_400_000).toISOString().slice(0, 10).replaceAll('-', '')}`;
    const names = rows.map((r) => r.name);
    expect(names).toEqual(expect.arrayContaining([day(-30), day(0), day(1), day(2)]));
  });

  it('stores records across a month (and year) boundary in their own partitions, queryable together', async () => {
    const site = await seedSite(database.db);
    // Written through the batch repository (the validator only takes records up to 30 days old,
    // and the boundary here is a fixed one).
    const boundary = Date.UTC(2026, 0, 1) / 1000;
    const times = [boundary - 90, boundary - 30, boundary + 30, boundary + 90];
    const repository = ingest.app.get(TelemetryBatchRepository);
    await repository.commit([
      {
        gatewayId: site.gatewayId,
        siteId: site.siteId,
        messageId: 1,
        receivedAt: Date.now(),
        recordCount: times.length,
        readings: times.map((t, i) => ({
          name: 'battery/voltage',
          pattern: 'battery/voltage' as const,
          key: null,
          t,
          valueType: 'number' as const,
          value: 25 + i,
          unit: 'V' as const,
        })),
        rejects: [],
      },
    ]);
    const { rows } = await sql<{ partition: string; value: number }>`
      select tableoid::regclass::text as partition, value from readings
      where site_id = ${site.siteId} order by time`.execute(database.db);
    expect(rows).toEqual([
      { partition: 'readings_p20251231', value: 25 },
      { partition: 'readings_p20251231', value: 26 },
      { partition: 'readings_p20260101', value: 27 },
      { partition: 'readings_p20260101', value: 28 },
    ]);
    expect((await readingsOf(database.db, site.siteId)).map((r) => r.value)).toEqual([
      25, 26, 27, 28,
    ]);

    // Minute buckets on both sides land in their monthly partitions too.
    const buckets = ingest.app.get(BucketsRepository);
    await database.db
      .transaction()
      .execute((trx) =>
        buckets.recomputeMinutes(
          trx,
          [site.siteId, site.siteId],
          [new Date((boundary - 60) * 1000), new Date(boundary * 1000)],
        ),
      );
    const { rows: minuteRows } = await sql<{ partition: string; sample_count: number }>`
      select tableoid::regclass::text as partition, sample_count from minute_buckets
      where site_id = ${site.siteId} order by bucket_start`.execute(database.db);
    expect(minuteRows).toEqual([
      { partition: 'minute_buckets_p20251201', sample_count: 1 },
      { partition: 'minute_buckets_p20260101', sample_count: 1 },
    ]);
  });

  it('drops raw partitions older than the retention, whole', async () => {
    const partitions = ingest.app.get(PartitionsService);
    const old = Date.now() - 120 * 86_400_000;
    await partitions.ensureCovering(old, old + 1000);
    const name = `readings_p${new Date(old).toISOString().slice(0, 10).replaceAll('-', '')}`;
    expect(await partitionNamed(name)).toBe(name);
    const dropped = await partitions.dropExpired();
    expect(dropped).toContain(name);
    expect(await partitionNamed(name)).toBeNull();
    // Partitions inside the retention stay.
    expect(
      dropped.every(
        (n) =>
          n <
          `readings_p${new Date(Date.now() - 89 * 86_400_000).toISOString().slice(0, 10).replaceAll('-', '')}`,
      ),
    ).toBe(true);
  });

  it('drops minute-bucket months older than their retention, whole, and keeps the rest', async () => {
    const partitions = ingest.app.get(PartitionsService);
    // 400 days kept (the harness, as the default): a month 500 days back goes, 300 days back stays.
    const old = Date.now() - 500 * 86_400_000;
    const recent = Date.now() - 300 * 86_400_000;
    await partitions.ensureCovering(old, old + 1000);
    await partitions.ensureCovering(recent, recent + 1000);
    const monthOf = (ms: number) =>
      `minute_buckets_p${new Date(ms).toISOString().slice(0, 7).replace('-', '')}01`;
    expect(await partitionNamed(monthOf(old))).toBe(monthOf(old));
    const dropped = await partitions.dropExpired();
    expect(dropped).toContain(monthOf(old));
    expect(await partitionNamed(monthOf(old))).toBeNull();
    expect(dropped).not.toContain(monthOf(recent));
    expect(await partitionNamed(monthOf(recent))).toBe(monthOf(recent));
  });
});

describe('history from before every partition', () => {
  it('rolls up late minutes of a month that has no minute partition (a CSV import of an old logger)', async () => {
    // Ingest has been rolling up closed minutes for a while (its watermark is now)...
    await sql`
      insert into rollup_state (name, watermark) values ('minute', date_trunc('minute', now()))
      on conflict (name) do nothing`.execute(database.db);
    // ...when the API's CSV import writes history: raw rows (their day's partition made for
    // them) and a pending mark per minute, for a month long before any minute partition.
    const minute = new Date('2023-05-10T08:30:00Z');
    expect(await partitionNamed('minute_buckets_p20230501')).toBeNull();
    const siteId = await siteWithReadings(minute, [
      [10, 25.2],
      [40, 25.6],
    ]);
    await sql`insert into rollup_pending (site_id, minute) values (${siteId}, ${minute})`.execute(
      database.db,
    );

    const sweep = await ingest.sweep();
    expect(sweep.lateMinutes).toBeGreaterThanOrEqual(1);
    const bucket = async (table: 'minute_buckets' | 'hour_buckets', start: Date) =>
      database.db
        .selectFrom(table)
        .select(['sample_count', 'min', 'max'])
        .where('site_id', '=', siteId)
        .where('bucket_start', '=', start)
        .executeTakeFirst();
    expect(await bucket('minute_buckets', minute)).toEqual({
      sample_count: 2,
      min: 25.2,
      max: 25.6,
    });
    expect(await bucket('hour_buckets', new Date('2023-05-10T08:00:00Z'))).toEqual({
      sample_count: 2,
      min: 25.2,
      max: 25.6,
    });
  });
});

describe('first roll-up of old history', () => {
  it('rolls up closed minutes of a month that has no minute partition yet', async () => {
    // A first sweep starts at the oldest reading; history imported before it can be years old.
    const minute = new Date('2022-07-04T12:00:00Z');
    await siteWithReadings(minute, [[5, 24.9]]);
    const buckets = ingest.app.get(BucketsRepository);
    const written = await database.db
      .transaction()
      .execute((trx) => buckets.rollUpMinutes(trx, minute, new Date(minute.getTime() + 60_000)));
    expect(written).toBe(1);
  });
});

describe('retention settings', () => {
  it('refuses minute buckets kept for less time than the raw readings they are rebuilt from', () => {
    expect(() =>
      readIngestConfig({
        DATABASE_URL: 'postgres://localhost/x',
        INGEST_RAW_RETENTION_DAYS: '120',
        INGEST_MINUTE_RETENTION_DAYS: '60',
      }),
    ).toThrow(/INGEST_MINUTE_RETENTION_DAYS must be at least INGEST_RAW_RETENTION_DAYS/);
    const config = readIngestConfig({ DATABASE_URL: 'postgres://localhost/x' });
    expect([config.rawRetentionDays, config.minuteRetentionDays]).toEqual([90, 400]);
  });
});
