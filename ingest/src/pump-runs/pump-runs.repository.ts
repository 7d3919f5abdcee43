import { Inject, Injectable } from '@nestjs/common';
import { sql, type Kysely } from 'kysely';
import { tankGeometryFrom, type TankConfig } from '@wellkept/core';
import type { DB } from '@wellkept/db';
import { DATABASE, type Database } from '../database/database.js';
import { TANK_DIMENSION_COLUMNS } from '../database/tank-dimensions.js';
import type { DerivedPumpRun, TimedValue } from './derive-pump-runs.js';

export interface PumpForRuns {
  id: string;
  siteId: string;
  key: string;
  ratedCurrentA: number;
  /** The storage tank this pump fills, if configured with its shape. */
  tank: TankConfig | null;
}

/** Pump runs and the pump, tank and sample data they are derived from. */
@Injectable()
export class PumpRunsRepository {
  constructor(@Inject(DATABASE) private readonly db: Database) {}

  get database(): Database {
    return this.db;
  }

  async pumpsAt(siteIds: readonly string[], db: Kysely<DB> = this.db): Promise<PumpForRuns[]> {
    if (siteIds.length === 0) return [];
    const rows = await db
      .selectFrom('pumps as p')
      .leftJoin('tanks as t', (j) =>
        j.onRef('t.id', '=', 'p.fills_tank_id').on('t.kind', '=', 'storage'),
      )
      .select([
        'p.id',
        'p.site_id',
        'p.key',
        'p.rated_current_a',
        't.key as tank_key',
        ...TANK_DIMENSION_COLUMNS,
        't.sensor_offset_m',
      ])
      .where('p.site_id', 'in', siteIds)
      .execute();
    return rows.map((r) => {
      const geometry = r.tank_key ? tankGeometryFrom(r) : null;
      return {
        id: r.id,
        siteId: r.site_id,
        key: r.key,
        ratedCurrentA: r.rated_current_a,
        tank:
          r.tank_key && geometry
            ? { key: r.tank_key, geometry, sensorOffsetMetres: r.sensor_offset_m ?? 0 }
            : null,
      };
    });
  }

  /** For each pump, the start of the run still open or ended within `gapSeconds` before `from`. */
  async overlappingRunStarts(
    pumps: readonly { pumpId: string; from: Date }[],
    gapSeconds: number,
    db: Kysely<DB> = this.db,
  ): Promise<Map<string, Date>> {
    if (pumps.length === 0) return new Map();
    const { rows } = await sql<{ pump_id: string; started_at: Date }>`
      select q.pump_id, min(r.started_at) as started_at
      from unnest(${pumps.map((p) => p.pumpId)}::uuid[],
                  ${pumps.map((p) => p.from.toISOString())}::timestamptz[]) as q(pump_id, from_t)
      join pump_runs r on r.pump_id = q.pump_id and r.started_at < q.from_t
        and (r.ended_at is null or r.ended_at >= q.from_t - ${gapSeconds} * interval '1 second')
      group by q.pump_id`.execute(db);
    return new Map(rows.map((r) => [r.pump_id, r.started_at]));
  }

  /** Samples of named channels from a time on, by `site\0name`, sorted by time. */
  async samples(
    wanted: readonly { siteId: string; name: string; from: Date }[],
    db: Kysely<DB> = this.db,
  ): Promise<Map<string, TimedValue[]>> {
    const out = new Map<string, TimedValue[]>();
    if (wanted.length === 0) return out;
    // Rows carry the index of what was asked for, not its site id and name: those two strings,
    // made afresh for every row, were most of the memory of a long read.
    const { rows } = await sql<{ i: number; t: number; v: number }>`
      select q.i::int as i, extract(epoch from r.time)::float8 as t, r.value as v
      from unnest(${wanted.map((w) => w.siteId)}::uuid[], ${wanted.map((w) => w.name)}::text[],
                  ${wanted.map((w) => w.from.toISOString())}::timestamptz[])
             with ordinality as q(site_id, name, from_t, i)
      join channels c on c.site_id = q.site_id and c.name = q.name
      join readings r on r.site_id = c.site_id and r.channel_id = c.id and r.time >= q.from_t
      where r.value is not null
      order by q.i, r.time`.execute(db);
    for (const r of rows) {
      const w = wanted[r.i - 1]!;
      const key = `${w.siteId}\u0000${w.name}`;
      let list = out.get(key);
      if (!list) out.set(key, (list = []));
      list.push({ t: r.t, v: r.v });
    }
    return out;
  }

  /** Replaces a pump's runs that start at or after `from` with the derived ones. */
  async replaceRuns(
    trx: Kysely<DB>,
    pump: { id: string; siteId: string },
    from: Date,
    runs: readonly DerivedPumpRun[],
  ): Promise<void> {
    const keep = runs.map((r) => new Date(r.startedAt * 1000).toISOString());
    await sql`
      delete from pump_runs where pump_id = ${pump.id} and started_at >= ${from}
        and not (started_at = any(${keep}::timestamptz[]))`.execute(trx);
    if (runs.length === 0) return;
    const iso = (t: number | null) => (t === null ? null : new Date(t * 1000).toISOString());
    await sql`
      insert into pump_runs (site_id, pump_id, started_at, ended_at, duration_s, energy_wh,
                             mean_current_a, water_m3, water_source, spans_gap, updated_at)
      select ${pump.siteId}::uuid, ${pump.id}::uuid, r.s, r.e, r.d, r.en, r.i, r.w, r.src, r.g, now()
      from unnest(${keep}::timestamptz[], ${runs.map((r) => iso(r.endedAt))}::timestamptz[],
                  ${runs.map((r) => r.durationS)}::float8[], ${runs.map((r) => r.energyWh)}::float8[],
                  ${runs.map((r) => r.meanCurrentA)}::float8[], ${runs.map((r) => r.waterM3)}::float8[],
                  ${runs.map((r) => r.waterSource)}::text[], ${runs.map((r) => r.spansGap)}::bool[])
        as r(s, e, d, en, i, w, src, g)
      on conflict (pump_id, started_at) do update set
        ended_at = excluded.ended_at, duration_s = excluded.duration_s,
        energy_wh = excluded.energy_wh, mean_current_a = excluded.mean_current_a,
        water_m3 = excluded.water_m3, water_source = excluded.water_source,
        spans_gap = excluded.spans_gap, updated_at = now()`.execute(trx);
  }
}
