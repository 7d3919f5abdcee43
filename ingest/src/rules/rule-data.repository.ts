import { Inject, Injectable } from '@nestjs/common';
import type { Sample, SeriesMap } from '@wellkept/core';
import { sql } from 'kysely';
import { DATABASE, type Database } from '../database/database.js';

/** How far back the evaluators look. */
export interface DataWindow {
  /** Raw readings of every channel this far back, seconds (core: two days cover every rule). */
  rawSeconds: number;
  /** Tank levels this far back (water use over several days), thinned to one per `thinSeconds`. */
  tankSeconds: number;
  thinSeconds: number;
}

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
    // sample (~27,000 at a site reporting every minute) cost ~40 ms of the event loop per
    // evaluation, JSON.parse of the same arrays ~5 ms. Values are float8 (booleans 0/1) or text.
    const { rows } = await sql<{
      name: string;
      kind: 'number' | 'boolean' | 'string';
      s: { t: number[]; v: (number | string | null)[] };
    }>`
      with samples as (
        -- Joining on site too lets the planner read only this site's channels; on id alone it
        -- probed every site's channels for each evaluation.
        select c.name, c.value_kind, r.time, r.value, r.text_value
        from readings r join channels c on c.id = r.channel_id and c.site_id = r.site_id
        where r.site_id = ${siteId} and r.time > ${rawFrom} and r.time <= ${now}
        union all
        select distinct on (c.name, date_bin(${`${window.thinSeconds} seconds`}::interval, r.time, timestamptz 'epoch'))
               c.name, c.value_kind, r.time, r.value, r.text_value
        from readings r join channels c on c.id = r.channel_id and c.site_id = r.site_id
        where r.site_id = ${siteId} and r.time > ${tankFrom} and r.time <= ${rawFrom}
          and c.name like 'tank/%/level'
      )
      select name, value_kind as kind,
             json_build_object(
               't', array_agg(extract(epoch from time)::float8 order by time),
               'v', case when value_kind = 'string' then to_json(array_agg(text_value order by time))
                         else to_json(array_agg(value order by time)) end) as s
      from samples group by name, value_kind`.execute(this.db);
    const series: Record<string, Sample<number | boolean | string>[]> = {};
    for (const { name, kind, s } of rows) {
      const samples: Sample<number | boolean | string>[] = [];
      for (let i = 0; i < s.t.length; i++) {
        const v = s.v[i];
        if (v === null || v === undefined) continue;
        samples.push({ t: s.t[i]!, v: kind === 'boolean' ? v !== 0 : v });
      }
      if (samples.length > 0) series[name] = samples;
    }
    return series;
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
