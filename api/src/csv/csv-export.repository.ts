import { Injectable } from '@nestjs/common';
import type { Database } from '@wellkept/db';
import { sql } from 'kysely';
import type { VisibleSite } from '../access/session-user.js';
import { InjectDb } from '../database/database.module.js';

const PAGE = 5000;

/**
 * Keyset-paged reads for the streamed exports: memory stays flat whatever the range, and no
 * transaction is held open while the client downloads.
 */
@Injectable()
export class CsvExportRepository {
  constructor(@InjectDb() private readonly db: Database) {}

  async *readings(site: VisibleSite, channelIds: number[], from: Date, to: Date) {
    type Row = { time: Date; channel_id: number; value: number | null; text_value: string | null };
    let after: Row | null = null;
    for (;;) {
      const cursor: Row | null = after;
      const result: { rows: Row[] } = await sql<Row>`
        select time, channel_id, value, text_value from readings
         where site_id = ${site.id} and channel_id = any(${channelIds}::int[])
           and time >= ${from} and time < ${to}
           ${cursor ? sql`and (time, channel_id) > (${cursor.time}, ${cursor.channel_id})` : sql``}
         order by time, channel_id
         limit ${PAGE}`.execute(this.db);
      for (const r of result.rows) yield r;
      if (result.rows.length < PAGE) return;
      after = result.rows[result.rows.length - 1]!;
    }
  }

  async *pumpRuns(site: VisibleSite, filter: { pumpId?: string; from?: Date; to?: Date }) {
    let afterId = 0;
    for (;;) {
      const rows = await this.db
        .selectFrom('pump_runs as r')
        .innerJoin('pumps as p', 'p.id', 'r.pump_id')
        .select([
          'r.id',
          'r.started_at',
          'r.ended_at',
          'p.key as pump_key',
          'r.duration_s',
          'r.energy_wh',
          'r.mean_current_a',
          'r.water_m3',
          'r.water_source',
          'r.spans_gap',
        ])
        .where('r.site_id', '=', site.id)
        .where('p.site_id', '=', site.id)
        .where('r.id', '>', afterId)
        .$if(filter.pumpId !== undefined, (qb) => qb.where('r.pump_id', '=', filter.pumpId!))
        .$if(filter.from !== undefined, (qb) => qb.where('r.started_at', '>=', filter.from!))
        .$if(filter.to !== undefined, (qb) => qb.where('r.started_at', '<', filter.to!))
        .orderBy('r.id')
        .limit(PAGE)
        .execute();
      for (const r of rows) yield r;
      if (rows.length < PAGE) return;
      afterId = rows[rows.length - 1]!.id;
    }
  }
}
