import { Inject, Injectable } from '@nestjs/common';
import { RULE_MEASUREMENTS, type Sample, type SeriesMap } from '@wellkept/core';
import { sql } from 'kysely';
import { textArrayLiteral } from '../database/array-literals.js';
import { DATABASE, type Database } from '../database/database.js';

/** How far back the evaluators look. */
export interface DataWindow {
  /** Raw readings of every channel this far back, seconds (core: two days cover every rule). */
  rawSeconds: number;
  /** Tank levels this far back (water use over several days), thinned to one per `thinSeconds`. */
  tankSeconds: number;
  thinSeconds: number;
}

/** RULE_MEASUREMENTS as LIKE patterns: a site's other channels are never read for the rules. */
const RULE_CHANNEL_PATTERNS = RULE_MEASUREMENTS.map((m) => m.replace(/<[^>]+>/g, '%'));

export const DEFAULT_DATA_WINDOW: DataWindow = {
  rawSeconds: 28 * 3600,
  tankSeconds: 4 * 86_400,
  thinSeconds: 600,
};

/**
 * Recent samples of a site for the rule evaluators, as core's `SeriesMap` (times in epoch
 * seconds, booleans as booleans, controller stage as text). Raw rows cover the last day and a
 * bit (the longest look-back of the data rules: a night, a day of starts); tank levels go back
 * further, thinned, for the days-of-water forecast.
 */
@Injectable()
export class RuleDataRepository {
  constructor(@Inject(DATABASE) private readonly db: Database) {}

  async series(
    siteId: string,
    now: Date,
    window: DataWindow = DEFAULT_DATA_WINDOW,
  ): Promise<SeriesMap> {
    const rawFrom = new Date(now.getTime() - window.rawSeconds * 1000);
    const tankFrom = new Date(now.getTime() - window.tankSeconds * 1000);
    // One row per channel, its samples as JSON arrays in time order: parsing one row object per
    // sample (~30,000 at a site reporting every 30 s) cost ~40 ms of the event loop per
    // evaluation, JSON.parse of the same arrays ~10 ms. Each channel's rows are read and sorted
    // on their own (a lateral join on the primary key), which PostgreSQL does in about a fifth of
    // the time of sorting all the site's rows together. Values are float8 (booleans 0/1) or text.
    const { rows } = await sql<{
      name: string;
      kind: 'number' | 'boolean' | 'string';
      s: { t: number[]; v: (number | string | null)[] };
    }>`
      select c.name, c.value_kind as kind, x.s
      from channels c cross join lateral (
        select count(*) as n,
               json_build_object(
                 't', array_agg(extract(epoch from y.time)::float8),
                 'v', case when c.value_kind = 'string' then to_json(array_agg(y.text_value))
                           else to_json(array_agg(y.value)) end) as s
        from (
          select r.time, r.value, r.text_value from readings r
          where r.site_id = c.site_id and r.channel_id = c.id
            and r.time > ${rawFrom} and r.time <= ${now}
          union all
          (select distinct on (b.bin) b.time, b.value, b.text_value
           from (
             select r.time, r.value, r.text_value,
                    date_bin(${`${window.thinSeconds} seconds`}::interval, r.time, timestamptz 'epoch') as bin
             from readings r
             where c.name like 'tank/%/level' and r.site_id = c.site_id and r.channel_id = c.id
               and r.time > ${tankFrom} and r.time <= ${rawFrom}) b
           order by b.bin, b.time)
          order by 1
        ) y
      ) x
      where c.site_id = ${siteId} and c.name like any(${RULE_CHANNEL_PATTERNS}::text[])
        and x.n > 0`.execute(this.db);
    const series: Record<string, Sample<number | boolean | string>[]> = {};
    for (const { name, kind, s } of rows) {
      const samples: Sample<number | boolean | string>[] = [];
      let sorted = true;
      for (let i = 0; i < s.t.length; i++) {
        const v = s.v[i];
        if (v === null || v === undefined) continue;
        const t = s.t[i]!;
        if (samples.length > 0 && t < samples[samples.length - 1]!.t) sorted = false;
        samples.push({ t, v: kind === 'boolean' ? v !== 0 : v });
      }
      // array_agg keeps the order its input arrives in, which the query's `order by 1` sets;
      // PostgreSQL does not promise it, so a different plan is caught here rather than trusted.
      if (!sorted) samples.sort((a, b) => a.t - b.t);
      if (samples.length > 0) series[name] = samples;
    }
    return series;
  }

  /**
   * Newest channel time of each site that has one, epoch seconds, from the channels' last
   * values alone (written a few seconds behind the commits): one scan for a whole fleet.
   */
  async newestChannelTimes(siteIds: readonly string[]): Promise<Map<string, number>> {
    if (siteIds.length === 0) return new Map();
    const { rows } = await sql<{ site_id: string; t: number }>`
      select site_id, extract(epoch from max(last_time))::float8 as t
      from channels where site_id = any(${textArrayLiteral(siteIds)}::uuid[]) and last_time is not null
      group by site_id`.execute(this.db);
    return new Map(rows.map((r) => [r.site_id, r.t]));
  }

  /**
   * Newest reading time at the site, epoch seconds: from the stored readings of the last two
   * days (one index probe per channel), else from the channels' last values (written a few
   * seconds behind the commits, and the only trace of older data).
   */
  async lastReadingT(siteId: string, now: Date): Promise<number | null> {
    const from = new Date(now.getTime() - 2 * 86_400_000);
    const { rows } = await sql<{ t: number | null }>`
      select extract(epoch from greatest(
               (select max(last_time) from channels where site_id = ${siteId}),
               (select max(m) from channels c cross join lateral (
                  select max(r.time) as m from readings r
                  where r.site_id = c.site_id and r.channel_id = c.id
                    and r.time > ${from} and r.time <= ${now}) l
                where c.site_id = ${siteId})))::float8 as t`.execute(this.db);
    return rows[0]?.t ?? null;
  }
}
