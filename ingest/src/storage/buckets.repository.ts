import { Injectable } from '@nestjs/common';
import { sql, type Kysely, type RawBuilder } from 'kysely';
import { ensureTimePartitions, type DB } from '@wellkept/db';
import { SWITCH_MAX_GAP_SECONDS } from './rollup-timing.js';

type Tx = Kysely<DB>;

/**
 * Per-sample columns for the minute roll-up, from raw readings: each sample with the previous
 * sample of its channel (looked up to SWITCH_MAX_GAP_SECONDS back). For switch channels a
 * bucket counts, at each of its samples, the interval since the previous sample if the switch
 * was on then (on_seconds), and off→on changes (starts); gaps longer than the maximum count as
 * unknown, not as on-time. Attributing each interval to the bucket of its end means a bucket
 * depends only on earlier samples, so buckets rolled up as minutes close never need the future.
 */
const SAMPLE_COLUMNS = sql`
  r.site_id, r.channel_id, r.time, r.value, c.value_kind = 'boolean' as is_switch,
  case when lag(r.value) over w = 1
         and r.time - lag(r.time) over w <= ${SWITCH_MAX_GAP_SECONDS} * interval '1 second'
       then extract(epoch from r.time - lag(r.time) over w) else 0 end as on_s,
  coalesce(r.value = 1 and lag(r.value) over w = 0, false) as is_start`;

const BUCKET_COLUMNS = sql`
  site_id, channel_id, bucket_start, sample_count, sum, min, max, first_value, first_time,
  last_value, last_time, on_seconds, starts`;

/** Aggregates of samples `x` grouped by (site, channel, bucket). */
const MINUTE_AGGREGATES = sql`
  count(*)::int, sum(x.value), min(x.value), max(x.value),
  (array_agg(x.value order by x.time))[1], min(x.time),
  (array_agg(x.value order by x.time desc))[1], max(x.time),
  case when bool_or(x.is_switch) then sum(x.on_s) end,
  case when bool_or(x.is_switch) then (count(*) filter (where x.is_start))::int end`;

/** Aggregates of minute buckets `m` into a longer bucket. */
const MERGED_AGGREGATES = sql`
  sum(m.sample_count)::int, sum(m.sum), min(m.min), max(m.max),
  (array_agg(m.first_value order by m.first_time))[1], min(m.first_time),
  (array_agg(m.last_value order by m.last_time desc))[1], max(m.last_time),
  sum(m.on_seconds), sum(m.starts)::int`;

const OVERWRITE = sql`
  sample_count = excluded.sample_count, sum = excluded.sum, min = excluded.min,
  max = excluded.max, first_value = excluded.first_value, first_time = excluded.first_time,
  last_value = excluded.last_value, last_time = excluded.last_time,
  on_seconds = excluded.on_seconds, starts = excluded.starts`;

/** Adds freshly closed minutes to a longer bucket that may already hold earlier ones. */
function accumulate(
  table: 'ten_minute_buckets' | 'hour_buckets' | 'six_hour_buckets' | 'day_buckets',
): RawBuilder<unknown> {
  const t = sql.table(table);
  return sql`
  sample_count = ${t}.sample_count + excluded.sample_count,
  sum = ${t}.sum + excluded.sum,
  min = least(${t}.min, excluded.min),
  max = greatest(${t}.max, excluded.max),
  first_value = case when excluded.first_time < ${t}.first_time then excluded.first_value else ${t}.first_value end,
  first_time = least(${t}.first_time, excluded.first_time),
  last_value = case when excluded.last_time >= ${t}.last_time then excluded.last_value else ${t}.last_value end,
  last_time = greatest(${t}.last_time, excluded.last_time),
  on_seconds = case when ${t}.on_seconds is null and excluded.on_seconds is null then null
                    else coalesce(${t}.on_seconds, 0) + coalesce(excluded.on_seconds, 0) end,
  starts = case when ${t}.starts is null and excluded.starts is null then null
                else coalesce(${t}.starts, 0) + coalesce(excluded.starts, 0) end`;
}

/** The site's local day that holds a bucket (day buckets follow the site's time zone). */
const LOCAL_DAY = sql`date_trunc('day', m.bucket_start, s.time_zone)`;

/**
 * The bucket tables of fixed UTC periods, built from minute buckets: the table, the period that
 * holds an instant, and the period's length. (Day buckets follow each site's time zone instead.)
 */
const UTC_TIERS: readonly {
  table: 'ten_minute_buckets' | 'hour_buckets' | 'six_hour_buckets';
  periodOf: (t: RawBuilder<unknown>) => RawBuilder<unknown>;
  length: RawBuilder<unknown>;
}[] = [
  {
    // :00, :10, ... :50 of every hour, for week-long charts.
    table: 'ten_minute_buckets',
    periodOf: (t) => sql`date_bin('10 minutes', ${t}, timestamptz '2000-01-01 00:00:00+00')`,
    length: sql`interval '10 minutes'`,
  },
  {
    table: 'hour_buckets',
    periodOf: (t) => sql`date_trunc('hour', ${t}, 'UTC')`,
    length: sql`interval '1 hour'`,
  },
  {
    // Quarter-days from 00, 06, 12 and 18 h, for year-long charts.
    table: 'six_hour_buckets',
    periodOf: (t) => sql`date_bin('6 hours', ${t}, timestamptz '2000-01-01 00:00:00+00')`,
    length: sql`interval '6 hours'`,
  },
];

/**
 * SQL of the bucket roll-up. Minute buckets are computed from raw readings; ten-minute buckets
 * (UTC, for week-long charts), hour buckets (UTC hours), six-hour buckets (UTC quarter-days, for
 * long charts) and day buckets (local days of the site) from minute buckets, either by adding
 * newly closed minutes (`accumulate`) or, for periods that received late rows, by recomputing
 * them whole from their minutes. String channels (controller stage) have no numeric buckets.
 */
@Injectable()
export class BucketsRepository {
  /** Minutes [from, to) of every site, from raw rows. Returns the buckets written. */
  async rollUpMinutes(trx: Tx, from: Date, to: Date): Promise<number> {
    // A first sweep starts at the oldest reading, which history imported from a file can put
    // before any minute partition (they are made a month back from now).
    await ensureTimePartitions(trx, 'minute_buckets', from, to);
    const result = await sql`
      insert into minute_buckets (${BUCKET_COLUMNS})
      select x.site_id, x.channel_id, date_trunc('minute', x.time, 'UTC'), ${MINUTE_AGGREGATES}
      from (
        select ${SAMPLE_COLUMNS}
        from (
          select r.site_id, r.channel_id, r.time, r.value from readings r
          where r.time >= ${from} and r.time < ${to} and r.value is not null
          union all
          -- The only earlier sample lag() reads: each switch's last one before the range. Reading
          -- the whole look-back for every channel scanned 11 minutes of rows to roll up one.
          select p.site_id, p.channel_id, p.time, p.value
          from channels sw cross join lateral (
            select r.site_id, r.channel_id, r.time, r.value from readings r
            where r.site_id = sw.site_id and r.channel_id = sw.id and r.value is not null
              and r.time >= ${from}::timestamptz - ${SWITCH_MAX_GAP_SECONDS} * interval '1 second'
              and r.time < ${from}
            order by r.time desc limit 1) p
          where sw.value_kind = 'boolean'
        ) r join channels c on c.id = r.channel_id
        window w as (partition by r.site_id, r.channel_id order by r.time)
      ) x
      where x.time >= ${from}
      group by 1, 2, 3
      on conflict (site_id, channel_id, bucket_start) do update set ${OVERWRITE}`.execute(trx);
    return Number(result.numAffectedRows ?? 0);
  }

  /** Adds the minute buckets of [from, to) to their ten-minute, hour, six-hour and day buckets. */
  async accumulateMinutes(trx: Tx, from: Date, to: Date): Promise<void> {
    for (const { table, periodOf } of UTC_TIERS) {
      await sql`
        insert into ${sql.table(table)} as ${sql.table(table)} (${BUCKET_COLUMNS})
        select m.site_id, m.channel_id, ${periodOf(sql`m.bucket_start`)}, ${MERGED_AGGREGATES}
        from minute_buckets m
        where m.bucket_start >= ${from} and m.bucket_start < ${to}
        group by 1, 2, 3
        on conflict (site_id, channel_id, bucket_start) do update set ${accumulate(table)}`.execute(
        trx,
      );
    }
    await sql`
      insert into day_buckets as day_buckets (${BUCKET_COLUMNS})
      select m.site_id, m.channel_id, ${LOCAL_DAY}, ${MERGED_AGGREGATES}
      from minute_buckets m join sites s on s.id = m.site_id
      where m.bucket_start >= ${from} and m.bucket_start < ${to}
      group by 1, 2, 3
      on conflict (site_id, channel_id, bucket_start) do update set ${accumulate('day_buckets')}`.execute(
      trx,
    );
  }

  /**
   * Recomputes the given (site, minute) buckets from raw rows, then their ten-minute periods,
   * hours, six-hour periods and days whole.
   */
  async recomputeMinutes(
    trx: Tx,
    sites: readonly string[],
    minutes: readonly Date[],
  ): Promise<void> {
    if (sites.length === 0) return;
    // History imported from a file can be older than any minute partition (they are made a month
    // back from now, and dropped after the minute retention): make the months it needs.
    const times = minutes.map((m) => m.getTime());
    await ensureTimePartitions(
      trx,
      'minute_buckets',
      new Date(Math.min(...times)),
      new Date(Math.max(...times) + 60_000),
    );
    const minuteIso = minutes.map((m) => m.toISOString());
    // Each (site, minute, channel) reads its eleven minutes by the index, in a lateral subquery:
    // joined directly, the planner read each channel's whole day and filtered the times
    // afterwards (5.6 million rows read to keep 132,000 for 1,500 late minutes of 300 sites).
    await sql`
      insert into minute_buckets (${BUCKET_COLUMNS})
      select x.site_id, x.channel_id, x.minute, ${MINUTE_AGGREGATES}
      from (
        select p.minute, ${SAMPLE_COLUMNS}
        from unnest(${sites}::uuid[], ${minuteIso}::timestamptz[]) as p(site_id, minute)
        join channels c on c.site_id = p.site_id
        cross join lateral (
          select r.site_id, r.channel_id, r.time, r.value from readings r
          where r.site_id = p.site_id and r.channel_id = c.id
            and r.time >= p.minute - ${SWITCH_MAX_GAP_SECONDS} * interval '1 second'
            and r.time < p.minute + interval '1 minute'
            and r.value is not null
          order by r.time) r
        window w as (partition by p.site_id, p.minute, r.channel_id order by r.time)
      ) x
      where x.time >= x.minute
      group by x.site_id, x.channel_id, x.minute
      on conflict (site_id, channel_id, bucket_start) do update set ${OVERWRITE}`.execute(trx);

    for (const { table, periodOf, length } of UTC_TIERS) {
      await sql`
        with touched as (
          select distinct p.site_id, ${periodOf(sql`p.minute`)} as period
          from unnest(${sites}::uuid[], ${minuteIso}::timestamptz[]) as p(site_id, minute))
        insert into ${sql.table(table)} (${BUCKET_COLUMNS})
        select m.site_id, m.channel_id, t.period, ${MERGED_AGGREGATES}
        from touched t join minute_buckets m on m.site_id = t.site_id
          and m.bucket_start >= t.period and m.bucket_start < t.period + ${length}
        group by m.site_id, m.channel_id, t.period
        on conflict (site_id, channel_id, bucket_start) do update set ${OVERWRITE}`.execute(trx);
    }

    await sql`
      with touched as (
        select distinct p.site_id, date_trunc('day', p.minute, s.time_zone) as day, s.time_zone
        from unnest(${sites}::uuid[], ${minuteIso}::timestamptz[]) as p(site_id, minute)
        join sites s on s.id = p.site_id)
      insert into day_buckets (${BUCKET_COLUMNS})
      select m.site_id, m.channel_id, t.day, ${MERGED_AGGREGATES}
      from touched t join minute_buckets m on m.site_id = t.site_id
        and m.bucket_start >= t.day
        and m.bucket_start < ((t.day at time zone t.time_zone) + interval '1 day') at time zone t.time_zone
      group by m.site_id, m.channel_id, t.day
      on conflict (site_id, channel_id, bucket_start) do update set ${OVERWRITE}`.execute(trx);
  }
}
