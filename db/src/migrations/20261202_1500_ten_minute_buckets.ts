import { sql, type Kysely } from 'kysely';

/**
 * Ten-minute buckets (UTC, aligned to the epoch like the six-hour ones), between minute and hour
 * buckets. A 7-day chart is drawn with 10-minute points: it read 10,080 minute buckets per
 * channel and regrouped them; from this table it reads the 1,008 points themselves. Maintained
 * by ingest's roll-up like the hour buckets; filled here from the minute buckets already stored.
 * LIKE copies the hour buckets' key, which migration 1410 made cover the columns a chart reads
 * (primary key (site_id, channel_id, bucket_start) include (sample_count, sum, min, max)), so a
 * series is an index-only scan here too. Not partitioned, like the hour buckets.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`
create table ten_minute_buckets (like hour_buckets including all);

insert into ten_minute_buckets (site_id, channel_id, bucket_start, sample_count, sum, min, max,
                                first_value, first_time, last_value, last_time, on_seconds, starts)
select m.site_id, m.channel_id,
       date_bin('10 minutes', m.bucket_start, timestamptz '2000-01-01 00:00:00+00'),
       sum(m.sample_count)::int, sum(m.sum), min(m.min), max(m.max),
       (array_agg(m.first_value order by m.first_time))[1], min(m.first_time),
       (array_agg(m.last_value order by m.last_time desc))[1], max(m.last_time),
       sum(m.on_seconds), sum(m.starts)::int
  from minute_buckets m
 group by 1, 2, 3;
`.execute(db);
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`drop table ten_minute_buckets`.execute(db);
}
