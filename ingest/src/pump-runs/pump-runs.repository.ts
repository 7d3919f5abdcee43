import { Inject, Injectable } from '@nestjs/common';
import { sql, type Kysely } from 'kysely';
import { tankGeometryFrom, type TankConfig } from '@wellkept/core';
import type { DB } from '@wellkept/db';
import { DATABASE, type Database } from '../database/database.js';
import { TANK_DIMENSION_COLUMNS } from '../database/tank-dimensions.js';
import type { DerivedPumpRun, OpenRunCarry, TimedValue } from './derive-pump-runs.js';

/**
 * Runs looked at before a re-derivation's start. More than this many runs ending within the
 * switch gap of it (one every 12 s) would only move the start later, to a run start all the
 * same, which is as valid a place to derive from.
 */
const LATEST_RUNS = 50;

/** A stored run that a re-derivation from some time has to start from. */
export interface OverlappingRun {
  startedAt: Date;
  open: boolean;
  carry: OpenRunCarry | null;
}

/** A pump's runs from `from` on, as derived, to replace the stored ones with. */
export interface RunsReplacement {
  pump: { id: string; siteId: string };
  from: Date;
  runs: readonly DerivedPumpRun[];
  carry: OpenRunCarry | null;
}

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

  /**
   * For each pump, the earliest of its runs still open or ended within `gapSeconds` before
   * `from`, with whether it is open and its carry. Runs do not overlap, so those runs are the
   * latest ones before `from`: only the last few are looked at, not the pump's whole history.
   */
  async overlappingRuns(
    pumps: readonly { pumpId: string; from: Date }[],
    gapSeconds: number,
    db: Kysely<DB> = this.db,
  ): Promise<Map<string, OverlappingRun>> {
    if (pumps.length === 0) return new Map();
    const { rows } = await sql<{
      pump_id: string;
      started_at: Date;
      open: boolean;
      carry: OpenRunCarry | null;
    }>`
      select q.pump_id, o.started_at, o.open, o.carry
      from unnest(${pumps.map((p) => p.pumpId)}::uuid[],
                  ${pumps.map((p) => p.from.toISOString())}::timestamptz[]) as q(pump_id, from_t)
      cross join lateral (
        select r.started_at, r.ended_at is null as open, r.open_run_carry as carry
        from (select started_at, ended_at, open_run_carry from pump_runs
              where pump_id = q.pump_id and started_at < q.from_t
              order by started_at desc limit ${LATEST_RUNS}) r
        where r.ended_at is null or r.ended_at >= q.from_t - ${gapSeconds} * interval '1 second'
        order by r.started_at limit 1) o`.execute(db);
    return new Map(
      rows.map((r) => [r.pump_id, { startedAt: r.started_at, open: r.open, carry: r.carry }]),
    );
  }

  /**
   * Samples of named channels from a time on (and before another, when given), sorted by time:
   * one list for each thing asked for, in the order asked (empty when there are none).
   */
  async samples(
    wanted: readonly { siteId: string; name: string; from: Date; before?: Date }[],
    db: Kysely<DB> = this.db,
  ): Promise<TimedValue[][]> {
    const out = wanted.map((): TimedValue[] => []);
    if (wanted.length === 0) return out;
    // Rows carry the index of what was asked for, not its site id and name: those two strings,
    // made afresh for every row, were most of the memory of a long read. The readings are read
    // in a lateral subquery that PostgreSQL cannot merge into the join (it is sorted), so each
    // channel's index scan starts at its own `from`: joined directly, the planner scanned every
    // channel's readings and dropped those before `from` afterwards (1.1 million rows read to
    // keep 48,000 in the pump-run benchmark).
    const { rows } = await sql<{ i: number; t: number; v: number }>`
      select q.i::int as i, extract(epoch from r.time)::float8 as t, r.value as v
      from unnest(${wanted.map((w) => w.siteId)}::uuid[], ${wanted.map((w) => w.name)}::text[],
                  ${wanted.map((w) => w.from.toISOString())}::timestamptz[],
                  ${wanted.map((w) => w.before?.toISOString() ?? 'infinity')}::timestamptz[])
             with ordinality as q(site_id, name, from_t, before_t, i)
      join channels c on c.site_id = q.site_id and c.name = q.name
      cross join lateral (
        select r.time, r.value from readings r
        where r.site_id = c.site_id and r.channel_id = c.id and r.time >= q.from_t
          and r.time < q.before_t
          and r.value is not null
        order by r.time) r
      order by q.i, r.time`.execute(db);
    for (const r of rows) out[r.i - 1]!.push({ t: r.t, v: r.v });
    return out;
  }

  /**
   * Replaces each pump's runs that start at or after its `from` with the derived ones, all
   * pumps in two statements; `carry` is the last run's when that one is open (every other
   * run's is cleared).
   */
  async replaceRuns(trx: Kysely<DB>, replacements: readonly RunsReplacement[]): Promise<void> {
    if (replacements.length === 0) return;
    const iso = (t: number | null) => (t === null ? null : new Date(t * 1000).toISOString());
    const runs = replacements.flatMap(({ pump, runs, carry }) =>
      runs.map((run) => ({
        pump,
        run,
        carry: carry && carry.startedAt === run.startedAt ? JSON.stringify(carry) : null,
      })),
    );
    const pumpIds = runs.map((r) => r.pump.id);
    const starts = runs.map((r) => iso(r.run.startedAt));
    await sql`
      delete from pump_runs r
      using unnest(${replacements.map((x) => x.pump.id)}::uuid[],
                   ${replacements.map((x) => x.from.toISOString())}::timestamptz[]) as q(pump_id, from_t)
      where r.pump_id = q.pump_id and r.started_at >= q.from_t
        and not exists (
          select 1 from unnest(${pumpIds}::uuid[], ${starts}::timestamptz[]) as k(pump_id, started_at)
          where k.pump_id = r.pump_id and k.started_at = r.started_at)`.execute(trx);
    if (runs.length === 0) return;
    const column = <T>(pick: (run: DerivedPumpRun) => T) => runs.map((r) => pick(r.run));
    await sql`
      insert into pump_runs (site_id, pump_id, started_at, ended_at, duration_s, energy_wh,
                             mean_current_a, water_m3, water_source, spans_gap, open_run_carry,
                             updated_at)
      select r.site, r.pump, r.s, r.e, r.d, r.en, r.i, r.w, r.src, r.g, r.carry::jsonb, now()
      from unnest(${runs.map((r) => r.pump.siteId)}::uuid[], ${pumpIds}::uuid[],
                  ${starts}::timestamptz[], ${column((r) => iso(r.endedAt))}::timestamptz[],
                  ${column((r) => r.durationS)}::float8[], ${column((r) => r.energyWh)}::float8[],
                  ${column((r) => r.meanCurrentA)}::float8[], ${column((r) => r.waterM3)}::float8[],
                  ${column((r) => r.waterSource)}::text[], ${column((r) => r.spansGap)}::bool[],
                  ${runs.map((r) => r.carry)}::text[])
        as r(site, pump, s, e, d, en, i, w, src, g, carry)
      on conflict (pump_id, started_at) do update set
        ended_at = excluded.ended_at, duration_s = excluded.duration_s,
        energy_wh = excluded.energy_wh, mean_current_a = excluded.mean_current_a,
        water_m3 = excluded.water_m3, water_source = excluded.water_source,
        spans_gap = excluded.spans_gap, open_run_carry = excluded.open_run_carry,
        updated_at = now()`.execute(trx);
  }
}
