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
    const { rows } = await sql<{
      name: string;
      kind: 'number' | 'boolean' | 'string';
      t: number;
      value: number | null;
      text: string | null;
    }>`
      -- Joining on site too lets the planner read only this site's channels; on id alone it
      -- probed every site's channels for each evaluation.
      select c.name, c.value_kind as kind, extract(epoch from r.time)::float8 as t,
             r.value, r.text_value as text
      from readings r join channels c on c.id = r.channel_id and c.site_id = r.site_id
      where r.site_id = ${siteId} and r.time > ${rawFrom} and r.time <= ${now}
      union all
      select distinct on (c.name, date_bin(${`${window.thinSeconds} seconds`}::interval, r.time, timestamptz 'epoch'))
             c.name, c.value_kind, extract(epoch from r.time)::float8, r.value, r.text_value
      from readings r join channels c on c.id = r.channel_id and c.site_id = r.site_id
      where r.site_id = ${siteId} and r.time > ${tankFrom} and r.time <= ${rawFrom}
        and c.name like 'tank/%/level'
      order by 3`.execute(this.db);
    const series: Record<string, Sample<number | boolean | string>[]> = {};
    for (const r of rows) {
      let v: number | boolean | string | null;
      if (r.kind === 'boolean') v = r.value === null ? null : r.value !== 0;
      else if (r.kind === 'string') v = r.text;
      else v = r.value;
      if (v === null) continue;
      (series[r.name] ??= []).push({ t: r.t, v });
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
