/**
 * Telemetry history for browser tests and the benchmark: the simulator's physics
 * (SiteSimulation) run over the demo sites, written to the same tables ingest fills
 * (channels, readings, minute/ten-minute/hour/six-hour/day buckets, gateways' last-seen). It
 * skips MQTT so a few days of history take seconds; the live-update test goes through the real
 * ingest instead.
 */
import { ensureTimePartitions, type Database } from '@wellkept/db';
import { parseMeasurementName, measurementSpec } from '@wellkept/core';
import { sql } from 'kysely';
import { demoSites } from '../../../simulator/src/demo/scenario.js';
import { SiteSimulation } from '../../../simulator/src/physics/site-simulation.js';

export interface HistoryOptions {
  /** Site names to fill (default: every demo site). */
  siteNames?: string[];
  days: number;
  stepSeconds: number;
  /** End of the history, epoch seconds (default: now). */
  endT?: number;
}

interface Row {
  channelId: number;
  t: number;
  value: number | null;
  text: string | null;
}

function channelShape(name: string): { unit: string; kind: 'number' | 'boolean' | 'string' } {
  const parsed = parseMeasurementName(name);
  if (!parsed) return { unit: '', kind: 'number' };
  const spec = measurementSpec(parsed.pattern);
  return { unit: spec.unit ?? '', kind: spec.valueType };
}

export async function seedHistory(
  db: Database,
  options: HistoryOptions,
): Promise<{ rows: number }> {
  const endT = Math.floor(options.endT ?? Date.now() / 1000);
  const startT = endT - options.days * 86400;
  const sites = await db.selectFrom('sites').select(['id', 'name']).execute();
  const specs = demoSites.filter((s) => !options.siteNames || options.siteNames.includes(s.name));
  await ensureTimePartitions(
    db,
    'readings',
    new Date(startT * 1000),
    new Date((endT + 86400) * 1000),
  );
  await ensureTimePartitions(
    db,
    'minute_buckets',
    new Date(startT * 1000),
    new Date((endT + 86400) * 1000),
  );
  let total = 0;
  for (const spec of specs) {
    const site = sites.find((s) => s.name === spec.name);
    if (!site) continue;
    const sim = new SiteSimulation(spec, { startT });
    const channelIds = new Map<string, number>();
    const channelFor = async (name: string) => {
      let id = channelIds.get(name);
      if (id === undefined) {
        const shape = channelShape(name);
        const row = await db
          .insertInto('channels')
          .values({ site_id: site.id, name, unit: shape.unit, value_kind: shape.kind })
          .onConflict((oc) => oc.columns(['site_id', 'name']).doUpdateSet({ unit: shape.unit }))
          .returning('id')
          .executeTakeFirstOrThrow();
        id = row.id;
        channelIds.set(name, id);
      }
      return id;
    };
    let batch: Row[] = [];
    const flush = async () => {
      if (!batch.length) return;
      await sql`
        insert into readings (site_id, channel_id, time, value, text_value)
        select ${site.id}::uuid, c, to_timestamp(t), v, x
          from unnest(${batch.map((r) => r.channelId)}::int[], ${batch.map((r) => r.t)}::float8[],
                      ${batch.map((r) => r.value)}::float8[], ${batch.map((r) => r.text)}::text[]) as u(c, t, v, x)
        on conflict do nothing`.execute(db);
      total += batch.length;
      batch = [];
    };
    for (let t = startT; t <= endT; t += options.stepSeconds) {
      sim.advanceTo(t);
      sim.takeSwitchEvents();
      for (const r of sim.readings()) {
        const id = await channelFor(r.name);
        const value =
          typeof r.value === 'boolean'
            ? r.value
              ? 1
              : 0
            : typeof r.value === 'number'
              ? r.value
              : null;
        batch.push({
          channelId: id,
          t: r.t,
          value,
          text: typeof r.value === 'string' ? r.value : null,
        });
      }
      if (batch.length >= 20_000) await flush();
    }
    await flush();
    await rollUp(db, site.id, new Date(startT * 1000), new Date((endT + 1) * 1000));
    await sql`
      update channels c set last_time = r.time, last_value = r.value, last_text = r.text_value
        from (select distinct on (channel_id) channel_id, time, value, text_value
                from readings where site_id = ${site.id} order by channel_id, time desc) r
       where c.id = r.channel_id`.execute(db);
    await db
      .updateTable('gateways')
      .set({ last_seen_at: new Date(endT * 1000), online: true })
      .where('site_id', '=', site.id)
      .execute();
  }
  return { rows: total };
}

/** Buckets the way ingest's roll-up defines them (switches: on-seconds). */
async function rollUp(db: Database, siteId: string, from: Date, to: Date): Promise<void> {
  for (const unit of ['minute', 'hour', 'day'] as const) {
    await sql`
      insert into ${sql.table(`${unit}_buckets`)} (site_id, channel_id, bucket_start, sample_count, sum, min, max,
                                     first_value, first_time, last_value, last_time)
      select site_id, channel_id, date_trunc(${unit}, time, 'UTC'), count(*), sum(value), min(value), max(value),
             (array_agg(value order by time))[1], min(time),
             (array_agg(value order by time desc))[1], max(time)
        from readings
       where site_id = ${siteId} and time >= ${from} and time < ${to} and value is not null
       group by 1, 2, 3
      on conflict do nothing`.execute(db);
  }
  // Ten-minute buckets feed week-long charts and six-hour buckets (UTC quarter-days) the longest
  // ones, both on the UTC epoch grid; each is skipped on a schema without it.
  for (const [table, width] of [
    ['ten_minute_buckets', '10 minutes'],
    ['six_hour_buckets', '6 hours'],
  ] as const) {
    const { rows } = await sql<{ present: boolean }>`
      select to_regclass(${table}) is not null as present`.execute(db);
    if (!rows[0]?.present) continue;
    await sql`
      insert into ${sql.table(table)} (site_id, channel_id, bucket_start, sample_count, sum, min, max,
                                       first_value, first_time, last_value, last_time)
      select site_id, channel_id, date_bin(${width}::interval, time, timestamptz '2000-01-01 00:00:00+00'),
             count(*), sum(value), min(value), max(value),
             (array_agg(value order by time))[1], min(time),
             (array_agg(value order by time desc))[1], max(time)
        from readings
       where site_id = ${siteId} and time >= ${from} and time < ${to} and value is not null
       group by 1, 2, 3
      on conflict do nothing`.execute(db);
  }
}

/**
 * Two open alerts as the rules would leave them (the rules run in ingest; the browser tests
 * need alerts to acknowledge without waiting for a fault to develop).
 */
export async function seedOpenAlerts(db: Database): Promise<{ siteName: string; kind: string }[]> {
  const made = [
    {
      siteName: 'Owl Creek Cabin',
      kind: 'overnight_sag',
      severity: 'watch',
      summary: 'Battery fell 1.4 V overnight (limit 1.0 V).',
    },
    {
      siteName: 'Juniper Bench Homestead',
      kind: 'dry_run',
      severity: 'act',
      subject: 'well',
      summary:
        'Well pump drew 2.1 A against 7.5 A rated for 12 minutes with no rise in the cistern.',
    },
  ] as const;
  for (const a of made) {
    const site = await db
      .selectFrom('sites')
      .select('id')
      .where('name', '=', a.siteName)
      .executeTakeFirstOrThrow();
    await db
      .insertInto('alerts')
      .values({
        site_id: site.id,
        kind: a.kind,
        severity: a.severity,
        status: 'open',
        subject: 'subject' in a ? a.subject : '',
        summary: a.summary,
        opened_at: new Date(Date.now() - 3 * 3600_000),
      })
      .execute();
  }
  return made.map((a) => ({ siteName: a.siteName, kind: a.kind }));
}
