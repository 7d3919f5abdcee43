import { Injectable } from '@nestjs/common';
import type { Database } from '@wellkept/db';
import type { VisibleSite } from '../access/session-user.js';
import { InjectDb } from '../database/database.module.js';

export interface PumpRunFilter {
  pumpId?: string;
  from?: Date;
  to?: Date;
}

@Injectable()
export class PumpRunsRepository {
  constructor(@InjectDb() private readonly db: Database) {}

  private filtered(site: VisibleSite, f: PumpRunFilter) {
    return this.db
      .selectFrom('pump_runs as r')
      .innerJoin('pumps as p', 'p.id', 'r.pump_id')
      .where('r.site_id', '=', site.id)
      .where('p.site_id', '=', site.id)
      .$if(f.pumpId !== undefined, (qb) => qb.where('r.pump_id', '=', f.pumpId!))
      .$if(f.from !== undefined, (qb) => qb.where('r.started_at', '>=', f.from!))
      .$if(f.to !== undefined, (qb) => qb.where('r.started_at', '<', f.to!));
  }

  async page(site: VisibleSite, f: PumpRunFilter, limit: number, before?: Date) {
    return this.filtered(site, f)
      .select([
        'r.id',
        'r.pump_id',
        'p.key as pump_key',
        'p.name as pump_name',
        'r.started_at',
        'r.ended_at',
        'r.duration_s',
        'r.energy_wh',
        'r.mean_current_a',
        'r.water_m3',
        'r.water_source',
        'r.spans_gap',
      ])
      .$if(before !== undefined, (qb) => qb.where('r.started_at', '<', before!))
      .orderBy('r.started_at', 'desc')
      .limit(limit)
      .execute();
  }

  async totals(site: VisibleSite, f: PumpRunFilter) {
    return this.filtered(site, f)
      .select((eb) => [
        eb.fn.countAll<number>().as('runs'),
        eb.fn.coalesce(eb.fn.sum<number>('r.duration_s'), eb.lit(0)).as('run_seconds'),
        eb.fn.coalesce(eb.fn.sum<number>('r.energy_wh'), eb.lit(0)).as('energy_wh'),
        eb.fn.coalesce(eb.fn.sum<number>('r.water_m3'), eb.lit(0)).as('water_m3'),
      ])
      .executeTakeFirstOrThrow();
  }

  /** Every run of the filter, oldest first, for the streamed CSV export. */
  stream(site: VisibleSite, f: PumpRunFilter) {
    return this.filtered(site, f)
      .select([
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
      .orderBy('r.started_at')
      .stream(1000);
  }
}
