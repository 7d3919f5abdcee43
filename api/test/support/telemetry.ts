import { type Database, ensureTimePartitions } from '@wellkept/db';
import { sql } from 'kysely';

export async function createChannel(
  db: Database,
  siteId: string,
  name: string,
  unit: string,
  valueKind: 'number' | 'boolean' | 'string' = 'number',
): Promise<number> {
  const row = await db
    .insertInto('channels')
    .values({ site_id: siteId, name, unit, value_kind: valueKind })
    .returning('id')
    .executeTakeFirstOrThrow();
  return row.id;
}

/**
 * Inserts evenly spaced raw readings with a deterministic wavy value, in one statement:
 * value(i) = base + amplitude * sin(i / 37) + (i % 7) * 0.01.
 */
export async function insertRawReadings(
  db: Database,
  siteId: string,
  channelId: number,
  from: Date,
  count: number,
  stepSeconds: number,
  base = 25,
  amplitude = 2,
): Promise<void> {
  await ensureTimePartitions(
    db,
    'readings',
    from,
    new Date(from.getTime() + count * stepSeconds * 1000 + 1),
  );
  await sql`
    insert into readings (site_id, channel_id, time, value)
    select ${siteId}::uuid, ${channelId}::int, ${from}::timestamptz + make_interval(secs => i * ${stepSeconds}),
           ${base}::float8 + ${amplitude}::float8 * sin(i / 37.0) + (i % 7) * 0.01
      from generate_series(0, ${count - 1}::int) as i`.execute(db);
}

/** The value insertRawReadings writes for reading number i. */
export function rawValue(i: number, base = 25, amplitude = 2): number {
  return base + amplitude * Math.sin(i / 37) + (i % 7) * 0.01;
}

/**
 * Rolls raw readings up into minute, ten-minute, hour, six-hour and day buckets (UTC) the way
 * ingest's roll-up defines them: count, sum, min, max, first and last value with their times.
 */
export async function rollUpAll(db: Database, siteId: string, from: Date, to: Date): Promise<void> {
  await ensureTimePartitions(db, 'minute_buckets', from, to);
  for (const [table, width] of [
    ['minute_buckets', '1 minute'],
    ['ten_minute_buckets', '10 minutes'],
    ['hour_buckets', '1 hour'],
    ['six_hour_buckets', '6 hours'],
    ['day_buckets', '1 day'],
  ] as const) {
    await sql`
      insert into ${sql.table(table)} (site_id, channel_id, bucket_start, sample_count, sum, min, max,
                                       first_value, first_time, last_value, last_time)
      select site_id, channel_id, date_bin(${width}::interval, time, timestamptz '2000-01-01 00:00:00+00'),
             count(*), sum(value), min(value), max(value),
             (array_agg(value order by time))[1], min(time),
             (array_agg(value order by time desc))[1], max(time)
        from readings
       where site_id = ${siteId} and time >= ${from} and time < ${to} and value is not null
       group by 1, 2, 3`.execute(db);
  }
}
