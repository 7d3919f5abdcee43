import { sql, type Kysely } from 'kysely';

/**
 * Six-hour buckets (UTC quarter-days starting 00, 06, 12, 18 h), between hour and day buckets.
 * A year of one channel is 1,460 of them: the API draws a 1-year chart from this table at its
 * native width instead of regrouping 8,760 hour buckets per channel, so the rows read per chart
 * stay near the points drawn (about 1,000 to 2,000) whatever the range. Maintained by ingest's
 * roll-up like the hour buckets; filled here from the hour buckets already stored.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`
create table six_hour_buckets (like hour_buckets including all);

insert into six_hour_buckets (site_id, channel_id, bucket_start, sample_count, sum, min, max,
                              first_value, first_time, last_value, last_time, on_seconds, starts)
select h.site_id, h.channel_id,
       date_bin('6 hours', h.bucket_start, timestamptz '2000-01-01 00:00:00+00'),
       sum(h.sample_count)::int, sum(h.sum), min(h.min), max(h.max),
       (array_agg(h.first_value order by h.first_time))[1], min(h.first_time),
       (array_agg(h.last_value order by h.last_time desc))[1], max(h.last_time),
       sum(h.on_seconds), sum(h.starts)::int
  from hour_buckets h
 group by 1, 2, 3;
`.execute(db);
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`drop table six_hour_buckets`.execute(db);
}
