import { Injectable } from '@nestjs/common';
import { sql } from 'kysely';
import type { Database } from '../database/database.js';

/** One numeric channel over the window, SI units. */
export interface ChannelFigures {
  name: string;
  unit: string;
  samples: number;
  min: number;
  max: number;
  last: number;
  lastAt: Date;
}

/** One pump's runs over the window. */
export interface PumpFigures {
  key: string;
  name: string;
  runs: number;
  runSeconds: number;
  waterCubicMetres: number | null;
  meanCurrentAmps: number | null;
}

/** The last 24 hours of a site in numbers, for installer and technician mail. */
export interface SiteDayFigures {
  from: Date;
  to: Date;
  channels: ChannelFigures[];
  pumps: PumpFigures[];
  lastReadingAt: Date | null;
}

/** Reads a site's recent numbers from raw readings and stored pump runs. */
@Injectable()
export class SiteDayFiguresRepository {
  async figures(db: Database, siteId: string, to: Date, hours = 24): Promise<SiteDayFigures> {
    const from = new Date(to.getTime() - hours * 3600_000);
    const [channels, pumps, latest] = await Promise.all([
      sql<{
        name: string;
        unit: string;
        samples: number;
        min: number;
        max: number;
        last: number;
        last_at: Date;
      }>`
        select c.name, c.unit, count(*)::int as samples, min(r.value) as min, max(r.value) as max,
               (array_agg(r.value order by r.time desc))[1] as last, max(r.time) as last_at
        from readings r join channels c on c.id = r.channel_id and c.site_id = r.site_id
        where r.site_id = ${siteId} and r.time > ${from} and r.time <= ${to}
          and c.value_kind = 'number' and r.value is not null
        group by c.name, c.unit
        order by c.name`.execute(db),
      sql<{
        key: string;
        name: string;
        runs: number;
        run_seconds: number | null;
        water_m3: number | null;
        mean_current_a: number | null;
      }>`
        select p.key, p.name, count(r.id)::int as runs, sum(r.duration_s) as run_seconds,
               sum(r.water_m3) as water_m3, avg(r.mean_current_a) as mean_current_a
        from pumps p
        left join pump_runs r on r.pump_id = p.id and r.started_at > ${from} and r.started_at <= ${to}
        where p.site_id = ${siteId}
        group by p.key, p.name
        order by p.key`.execute(db),
      sql<{ last: Date | null }>`
        select max(last_time) as last from channels where site_id = ${siteId}`.execute(db),
    ]);
    return {
      from,
      to,
      channels: channels.rows.map((r) => ({
        name: r.name,
        unit: r.unit,
        samples: r.samples,
        min: r.min,
        max: r.max,
        last: r.last,
        lastAt: r.last_at,
      })),
      pumps: pumps.rows.map((r) => ({
        key: r.key,
        name: r.name,
        runs: r.runs,
        runSeconds: r.run_seconds ?? 0,
        waterCubicMetres: r.water_m3,
        meanCurrentAmps: r.mean_current_a,
      })),
      lastReadingAt: latest.rows[0]?.last ?? null,
    };
  }
}
