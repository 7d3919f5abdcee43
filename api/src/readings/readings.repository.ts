import { Injectable } from '@nestjs/common';
import { keptFrom, type Database } from '@wellkept/db';
import { sql } from 'kysely';
import type { VisibleSite } from '../access/session-user.js';
import { InjectDb } from '../database/database.module.js';
import type { SeriesSource } from './series-resolution.js';

export interface ChannelRow {
  id: number;
  name: string;
  unit: string;
  value_kind: 'number' | 'boolean' | 'string';
  last_time: Date | null;
  last_value: number | null;
  last_text: string | null;
}

/** One aggregated point of one channel. */
export interface SeriesRow {
  channel_id: number;
  t: number;
  mean: number;
  min: number;
  max: number;
  /** Stored rows behind the point when several were merged into it; absent means one. */
  rows?: number;
}

const BUCKET_TABLE = {
  minute: 'minute_buckets',
  ten_minute: 'ten_minute_buckets',
  hour: 'hour_buckets',
  six_hour: 'six_hour_buckets',
  day: 'day_buckets',
} as const;

const BUCKET_SECONDS = {
  minute: 60,
  ten_minute: 600,
  hour: 3600,
  six_hour: 21600,
  day: 86400,
} as const;

/** Telemetry reads: channels, series from raw readings or buckets, and streamed exports. */
@Injectable()
export class ReadingsRepository {
  constructor(@InjectDb() private readonly db: Database) {}

  /** Where the raw readings kept begin (older days live on in the buckets only). */
  rawKeptFrom(): Promise<Date | null> {
    return keptFrom(this.db, 'readings');
  }

  /** Where the minute buckets kept begin (older months live on in coarser buckets). */
  minutesKeptFrom(): Promise<Date | null> {
    return keptFrom(this.db, 'minute_buckets');
  }

  async channels(site: VisibleSite): Promise<ChannelRow[]> {
    return this.db
      .selectFrom('channels')
      .select(['id', 'name', 'unit', 'value_kind', 'last_time', 'last_value', 'last_text'])
      .where('site_id', '=', site.id)
      .orderBy('name')
      .execute();
  }

  /**
   * Points of several channels between two instants. Bucket sources are regrouped into
   * `stepSeconds`-wide points on the UTC epoch grid: the mean is weighted by sample counts
   * (sum of sums over sum of counts), so it equals the mean of the raw readings inside.
   */
  async series(
    site: VisibleSite,
    channelIds: number[],
    source: SeriesSource,
    stepSeconds: number,
    from: Date,
    to: Date,
  ): Promise<SeriesRow[]> {
    if (source === 'raw') {
      const { rows } = await sql<SeriesRow>`
        select channel_id, (extract(epoch from time) * 1000)::float8 as t,
               value as mean, value as min, value as max
          from readings
         where site_id = ${site.id} and channel_id = any(${channelIds}::int[])
           and time >= ${from} and time < ${to} and value is not null
         order by channel_id, time`.execute(this.db);
      return rows;
    }
    const table = sql.table(BUCKET_TABLE[source]);
    if (stepSeconds === BUCKET_SECONDS[source]) {
      // Points are the buckets themselves: one index-only range scan per channel, already in
      // time order (the key covers the columns read, migration 1410). With `channel_id = any()`
      // PostgreSQL 15 scans the same ranges but then sorts every row. No outer ORDER BY: the
      // service groups rows by channel, and each channel's rows come in its subquery's order.
      // The row is kept narrow (a year is 1,460 rows a channel, and their transfer and parsing
      // are most of the request): date_part is float8 arithmetic where extract() computes in
      // numeric (exact here: bucket starts are whole seconds), and no constant row count.
      const { rows } = await sql<SeriesRow>`
        select c.id as channel_id, date_part('epoch', b.bucket_start) * 1000 as t,
               b.sum / b.sample_count as mean, b.min, b.max
          from unnest(${channelIds}::int[]) with ordinality as c(id, ord)
         cross join lateral (
               select bucket_start, sum, sample_count, min, max
                 from ${table}
                where site_id = ${site.id} and channel_id = c.id
                  and bucket_start >= ${from} and bucket_start < ${to}
                order by bucket_start) b`.execute(this.db);
      return rows;
    }
    const { rows } = await sql<SeriesRow>`
      select channel_id,
             (floor(extract(epoch from bucket_start) / ${stepSeconds}) * ${stepSeconds} * 1000)::float8 as t,
             sum(sum) / sum(sample_count) as mean,
             min(min) as min,
             max(max) as max,
             count(*)::int as rows
        from ${table}
       where site_id = ${site.id} and channel_id = any(${channelIds}::int[])
         and bucket_start >= ${from} and bucket_start < ${to}
       group by 1, 2
       order by 1, 2`.execute(this.db);
    return rows;
  }
}
