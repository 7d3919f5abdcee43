import { tankVolumeFromLevel } from '@wellkept/core';
import type { Database } from '@wellkept/db';
import { sql } from 'kysely';
import { derivePumpRuns, type TimedValue } from '../../ingest/src/pump-runs/derive-pump-runs.js';
import type { CaughtMessage } from './restartable-catcher.js';
import {
  RECORDS_PER_PACK,
  SAMPLE_SPACING_S,
  TelemetryGateways,
  type GatewayLog,
} from './telemetry-gateways.js';

/** Acknowledged packs against the rows in the database, for packs numbered [fromSeq, toSeq). */
export interface TelemetryFigures {
  published: number;
  acknowledged: number;
  /** Packs whose every record is in the database. */
  stored: number;
  /** Acknowledged packs with a record missing: must be zero. */
  missing: number;
  /** Records stored more than once (same site, channel, time): must be zero. */
  duplicateRows: number;
  /** Packs the gateways sent more than once (re-sends after a fault, deliberate repeats). */
  resent: number;
  /** Packs published but never acknowledged (not a loss: the gateway still holds them). */
  unacknowledged: number;
  /** A few missing packs, for the report. */
  missingExamples: string[];
}

/**
 * Compares the gateways' PUBACK logs with the readings table. A pack's sample time is
 * `t0 + seq × spacing`, so each pack maps to exactly one time per site; a pack is stored when
 * all its records are there. `range` limits the count to the packs of one fault.
 */
export async function telemetryFigures(
  db: Database,
  logs: readonly GatewayLog[],
  t0: number,
  range: Map<string, { from: number; to: number }> | null,
  resentBefore: Map<string, number> = new Map(),
): Promise<TelemetryFigures> {
  const siteIds = logs.map((l) => l.gateway.siteId);
  const { rows } = await sql<{ site_id: string; t: number; n: number; channels: number }>`
    select site_id, extract(epoch from time)::float8 as t, count(*)::int as n,
           count(distinct channel_id)::int as channels
    from readings where site_id = any(${siteIds}::uuid[])
    group by site_id, time`.execute(db);
  const bySite = new Map<string, Map<number, { n: number; channels: number }>>();
  for (const r of rows) {
    let m = bySite.get(r.site_id);
    if (!m) bySite.set(r.site_id, (m = new Map()));
    m.set(Math.round(r.t), { n: r.n, channels: r.channels });
  }
  const f: TelemetryFigures = {
    published: 0,
    acknowledged: 0,
    stored: 0,
    missing: 0,
    duplicateRows: 0,
    resent: 0,
    unacknowledged: 0,
    missingExamples: [],
  };
  for (const log of logs) {
    const id = log.gateway.gatewayId;
    const times = bySite.get(log.gateway.siteId) ?? new Map();
    const r = range?.get(id) ?? { from: 0, to: log.next };
    for (let seq = r.from; seq < r.to; seq++) {
      if (!log.published.has(seq)) continue;
      f.published += 1;
      const row = times.get(t0 + seq * SAMPLE_SPACING_S);
      const complete = row !== undefined && row.channels === RECORDS_PER_PACK;
      if (complete) f.stored += 1;
      if (row && row.n > row.channels) f.duplicateRows += row.n - row.channels;
      if (log.acked.has(seq)) {
        f.acknowledged += 1;
        if (!complete) {
          f.missing += 1;
          if (f.missingExamples.length < 5) f.missingExamples.push(`${id}#${seq}`);
        }
      } else f.unacknowledged += 1;
    }
    f.resent += TelemetryGateways.duplicateSends(log) - (resentBefore.get(id) ?? 0);
  }
  return f;
}

export interface DerivedCheck {
  /** Rows compared. */
  compared: number;
  /** Rows that differ, are missing or are extra: must be zero. */
  mismatched: number;
  examples: string[];
}

/** Matching numbers: equal, or equal to about 1e-6 relative (sums of doubles in another order). */
const NEAR = (a: string, b: string) =>
  sql.raw(`(${a} is not distinct from ${b} or abs(${a} - ${b}) <= 1e-6 * greatest(1, abs(${a})))`);

/**
 * Minute, ten-minute, hour, six-hour and day buckets of the given sites against a recomputation
 * from every raw row (one window over each channel's whole history, not the sweep's incremental
 * passes). Only time before the roll-up's watermark counts: later minutes are not rolled up yet
 * by design.
 */
export async function bucketCheck(db: Database, siteIds: readonly string[]): Promise<DerivedCheck> {
  const out: DerivedCheck = { compared: 0, mismatched: 0, examples: [] };
  const periods = {
    minute_buckets: sql`date_trunc('minute', x.time, 'UTC')`,
    ten_minute_buckets: sql`date_bin('10 minutes', x.time, timestamptz '2000-01-01 00:00:00+00')`,
    hour_buckets: sql`date_trunc('hour', x.time, 'UTC')`,
    six_hour_buckets: sql`date_bin('6 hours', x.time, timestamptz '2000-01-01 00:00:00+00')`,
    day_buckets: sql`date_trunc('day', x.time, s.time_zone)`,
  };
  for (const [table, bucket] of Object.entries(periods)) {
    const { rows } = await sql<{ compared: number; mismatched: number; example: string | null }>`
      with wm as (select watermark from rollup_state where name = 'minute'),
      samples as (
        select r.site_id, r.channel_id, r.time, r.value, c.value_kind = 'boolean' as is_switch,
          case when lag(r.value) over w = 1 and r.time - lag(r.time) over w <= interval '600 seconds'
               then extract(epoch from r.time - lag(r.time) over w) else 0 end as on_s,
          coalesce(r.value = 1 and lag(r.value) over w = 0, false) as is_start
        from readings r join channels c on c.id = r.channel_id
        where r.site_id = any(${siteIds}::uuid[]) and r.value is not null
          and r.time < (select watermark from wm)
        window w as (partition by r.site_id, r.channel_id order by r.time)),
      expected as (
        select x.site_id, x.channel_id, ${bucket} as bucket_start, count(*)::int as n,
               sum(x.value) as s, min(x.value) as lo, max(x.value) as hi,
               min(x.time) as ft, max(x.time) as lt,
               case when bool_or(x.is_switch) then sum(x.on_s) end as on_s,
               case when bool_or(x.is_switch) then (count(*) filter (where x.is_start))::int end as starts
        from samples x join sites s on s.id = x.site_id
        group by 1, 2, 3),
      actual as (
        select b.* from ${sql.table(table)} b
        where b.site_id = any(${siteIds}::uuid[])
          and b.first_time < (select watermark from wm)),
      joined as (
        select e.site_id as e_site, a.site_id as a_site, coalesce(e.bucket_start, a.bucket_start) as at,
          format('channel %s: n %s/%s sum %s/%s on_s %s/%s starts %s/%s first %s/%s last %s/%s',
                 coalesce(e.channel_id, a.channel_id), e.n, a.sample_count, e.s, a.sum, e.on_s,
                 a.on_seconds, e.starts, a.starts, e.ft, a.first_time, e.lt, a.last_time) as detail,
          e.n = a.sample_count and ${NEAR('e.s', 'a.sum')} and ${NEAR('e.lo', 'a.min')}
            and ${NEAR('e.hi', 'a.max')} and e.ft = a.first_time and e.lt = a.last_time
            and ${NEAR('e.on_s', 'a.on_seconds')} and e.starts is not distinct from a.starts as same
        from expected e full join actual a
          on a.site_id = e.site_id and a.channel_id = e.channel_id and a.bucket_start = e.bucket_start)
      select count(*)::int as compared,
             (count(*) filter (where e_site is null or a_site is null or not same))::int as mismatched,
             min(case when e_site is null then 'extra ' || at || ' ' || detail
                      when a_site is null then 'absent ' || at || ' ' || detail
                      when not same then 'differs ' || at || ' ' || detail end) as example
      from joined`.execute(db);
    const r = rows[0]!;
    out.compared += r.compared;
    out.mismatched += r.mismatched;
    if (r.example) out.examples.push(`${table}: ${r.example}`);
  }
  return out;
}

/**
 * Pump runs of the given sites against a derivation from every raw sample at once, up to the
 * roll-up's watermark (runs are derived up to it, like the buckets).
 */
export async function pumpRunCheck(
  db: Database,
  siteIds: readonly string[],
): Promise<DerivedCheck> {
  const out: DerivedCheck = { compared: 0, mismatched: 0, examples: [] };
  const pumps = await db
    .selectFrom('pumps as p')
    .innerJoin('tanks as t', 't.id', 'p.fills_tank_id')
    .select([
      'p.id',
      'p.site_id',
      'p.key',
      'p.rated_current_a',
      't.key as tank',
      't.diameter_m',
      't.height_m',
    ])
    .where(
      'p.site_id',
      'in',
      siteIds.length ? [...siteIds] : ['00000000-0000-0000-0000-000000000000'],
    )
    .execute();
  for (const pump of pumps) {
    const series = async (name: string): Promise<TimedValue[]> => {
      const { rows } = await sql<{ t: number; v: number }>`
        select extract(epoch from r.time)::float8 as t, r.value as v
        from readings r join channels c on c.id = r.channel_id
        where c.site_id = ${pump.site_id} and c.name = ${name} and r.value is not null
          and r.time < (select watermark from rollup_state where name = 'minute')
        order by r.time`.execute(db);
      return rows;
    };
    const levels = await series(`tank/${pump.tank}/level`);
    const tankVolume: TimedValue[] = [];
    for (const s of levels) {
      const v = tankVolumeFromLevel(
        {
          key: pump.tank,
          geometry: {
            shape: 'vertical_cylinder',
            diameterMetres: pump.diameter_m ?? 0,
            heightMetres: pump.height_m ?? 0,
          },
        },
        s.v,
      );
      if (v.ok) tankVolume.push({ t: s.t, v: v.cubicMetres });
    }
    const expected = derivePumpRuns({
      running: await series(`pump/${pump.key}/running`),
      current: await series(`pump/${pump.key}/current`),
      flow: await series(`pump/${pump.key}/flow`),
      batteryVoltage: await series('battery/voltage'),
      tankVolume,
      ratedCurrentA: pump.rated_current_a,
      maxGapSeconds: 600,
    });
    const actual = await db
      .selectFrom('pump_runs')
      .selectAll()
      .where('pump_id', '=', pump.id)
      .orderBy('started_at')
      .execute();
    const near = (a: number | null, b: number | null) =>
      a === b || (a !== null && b !== null && Math.abs(a - b) <= 1e-6 * Math.max(1, Math.abs(a)));
    const byStart = new Map(actual.map((r) => [r.started_at.getTime() / 1000, r]));
    out.compared += Math.max(expected.length, actual.length);
    for (const e of expected) {
      const a = byStart.get(e.startedAt);
      byStart.delete(e.startedAt);
      const same =
        a !== undefined &&
        (a.ended_at === null ? null : a.ended_at.getTime() / 1000) === e.endedAt &&
        near(a.duration_s, e.durationS) &&
        near(a.energy_wh, e.energyWh) &&
        near(a.mean_current_a, e.meanCurrentA) &&
        near(a.water_m3, e.waterM3) &&
        a.water_source === e.waterSource &&
        a.spans_gap === e.spansGap;
      if (!same) {
        out.mismatched += 1;
        if (out.examples.length < 5)
          out.examples.push(
            `pump ${pump.id} run at ${new Date(e.startedAt * 1000).toISOString()} ${a ? 'differs' : 'absent'}`,
          );
      }
    }
    for (const extra of byStart.values()) {
      out.mismatched += 1;
      if (out.examples.length < 5)
        out.examples.push(`pump ${pump.id} extra run at ${extra.started_at.toISOString()}`);
    }
  }
  return out;
}

export interface MailFigures {
  /** Alert events (open, reopen, clear) at the watched sites. */
  events: number;
  /** Events not yet turned into mail. */
  eventsPending: number;
  /** Outbox rows for those events. */
  outbox: number;
  /** Outbox rows not sent yet. */
  unsent: number;
  /** Messages the catcher received for those rows. */
  delivered: number;
  /** Rows delivered more than once (extra copies): must be zero. */
  duplicated: number;
  /** Rows marked sent that the catcher never received: must be zero. */
  lost: number;
}

/**
 * Alert mail of the given sites: every event became one outbox row per recipient, and every
 * row reached the catcher exactly once (matched by the outbox's stable Message-ID).
 */
export async function mailFigures(
  db: Database,
  siteIds: readonly string[],
  caught: readonly CaughtMessage[],
): Promise<MailFigures> {
  const { rows: events } = await sql<{ n: number; pending: number }>`
    select count(*)::int as n, (count(*) filter (where notified_at is null))::int as pending
    from alert_events where site_id = any(${siteIds}::uuid[]) and event <> 'acknowledged'`.execute(
    db,
  );
  const { rows: outbox } = await sql<{ id: number; sent: boolean }>`
    select o.id, o.sent_at is not null as sent
    from email_outbox o join alert_events e on e.id = o.alert_event_id
    where e.site_id = any(${siteIds}::uuid[])`.execute(db);
  const copies = new Map<number, number>();
  for (const m of caught) {
    const id = /^<outbox-(\d+)@/.exec(m.messageId)?.[1];
    if (id) copies.set(Number(id), (copies.get(Number(id)) ?? 0) + 1);
  }
  const f: MailFigures = {
    events: events[0]!.n,
    eventsPending: events[0]!.pending,
    outbox: outbox.length,
    unsent: 0,
    delivered: 0,
    duplicated: 0,
    lost: 0,
  };
  for (const row of outbox) {
    const n = copies.get(row.id) ?? 0;
    if (!row.sent) f.unsent += 1;
    if (n > 0) f.delivered += 1;
    if (n > 1) f.duplicated += n - 1;
    if (row.sent && n === 0) f.lost += 1;
  }
  return f;
}
