import { useTestDatabase } from '@wellkept/db/testing';
import { sql } from 'kysely';
import type { MqttClient } from 'mqtt';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  baseName,
  connectGateway,
  publishAcked,
  seedSite,
  startTestIngest,
  type RunningIngest,
  type SeededSite,
} from './support/ingest-harness.js';

const database = useTestDatabase('ingest_buckets');
let ingest: RunningIngest;
let site: SeededSite;
let client: MqttClient;

const HOUR = 3600;
/** Ten minutes into the hour that began about six hours ago. */
const t0 = Math.floor((Date.now() / 1000 - 6 * HOUR) / HOUR) * HOUR + 600;

/**
 * A pump run recorded by a gateway that was offline: every 30 s from t0 to t0+360 the switch
 * (off at t0 and t0+360, on between), the pump current (6 A while on), a steady 25 V bank and
 * the tank rising from 1.00 m to 1.30 m while the pump runs.
 */
function sample(offset: number) {
  const on = offset > 0 && offset < 360;
  const level = 1 + (0.3 * Math.min(Math.max(offset - 30, 0), 330)) / 330;
  return [
    { n: 'pump/well/running', t: offset, vb: on },
    { n: 'pump/well/current', u: 'A', t: offset, v: on ? 6 : 0 },
    { n: 'battery/voltage', u: 'V', t: offset, v: 25 },
    { n: 'tank/main/level', u: 'm', t: offset, v: Number(level.toFixed(4)) },
  ];
}

function pack(offsets: number[]): string {
  return JSON.stringify([{ bn: baseName(site.gatewayId), bt: t0 }, ...offsets.flatMap(sample)]);
}

async function bucket(
  table:
    'minute_buckets' | 'ten_minute_buckets' | 'hour_buckets' | 'six_hour_buckets' | 'day_buckets',
  name: string,
  start: Date,
) {
  const { rows } = await sql<{
    sample_count: number;
    sum: number;
    min: number;
    max: number;
    first_value: number;
    last_value: number;
    first_time: Date;
    last_time: Date;
    on_seconds: number | null;
    starts: number | null;
  }>`
    select b.* from ${sql.table(table)} b join channels c on c.id = b.channel_id
    where b.site_id = ${site.siteId} and c.name = ${name} and b.bucket_start = ${start}`.execute(
    database.db,
  );
  return rows[0];
}

beforeAll(async () => {
  ingest = await startTestIngest(database.url);
  site = await seedSite(database.db, { timeZone: 'America/Denver' });
  client = await connectGateway(ingest.mqttUrl, site);
  await ingest.sweep(); // starts the watermark at "now": everything below arrives late
});

afterAll(async () => {
  client?.end(true);
  await ingest?.close();
});

describe('late data (a pack six hours old)', () => {
  it('updates minute, hour and day buckets and opens a pump run', async () => {
    // First half of the outage: the pump is still on at the last sample.
    await publishAcked(
      client,
      `gateways/${site.gatewayId}/senml`,
      pack([0, 30, 60, 90, 120, 150, 180]),
    );
    const sweep = await ingest.sweep();
    expect(sweep.lateMinutes).toBeGreaterThan(0);

    const minute = await bucket('minute_buckets', 'pump/well/running', new Date((t0 + 60) * 1000));
    expect(minute).toMatchObject({ sample_count: 2, on_seconds: 60, starts: 0, min: 1, max: 1 });
    const firstMinute = await bucket('minute_buckets', 'pump/well/running', new Date(t0 * 1000));
    expect(firstMinute).toMatchObject({
      sample_count: 2,
      on_seconds: 0,
      starts: 1,
      first_value: 0,
      last_value: 1,
    });

    const runs = await database.db
      .selectFrom('pump_runs')
      .selectAll()
      .where('pump_id', '=', site.pumpId)
      .execute();
    expect(runs).toHaveLength(1);
    expect(runs[0]).toMatchObject({
      started_at: new Date((t0 + 30) * 1000),
      ended_at: null,
      spans_gap: false,
    });
  });

  it('closes the run and recomputes the buckets when the rest arrives', async () => {
    await publishAcked(
      client,
      `gateways/${site.gatewayId}/senml`,
      pack([210, 240, 270, 300, 330, 360]),
    );
    await ingest.sweep();

    const hourStart = new Date((t0 - 600) * 1000);
    const hour = await bucket('hour_buckets', 'pump/well/running', hourStart);
    expect(hour).toMatchObject({
      sample_count: 13,
      sum: 11,
      on_seconds: 330,
      starts: 1,
      first_value: 0,
      last_value: 0,
      first_time: new Date(t0 * 1000),
      last_time: new Date((t0 + 360) * 1000),
    });
    const voltage = await bucket('hour_buckets', 'battery/voltage', hourStart);
    expect(voltage).toMatchObject({
      sample_count: 13,
      sum: 325,
      min: 25,
      max: 25,
      on_seconds: null,
      starts: null,
    });

    // Both packs fall in the ten-minute period starting at t0: recomputed whole from its minutes.
    const tenMinutes = await bucket('ten_minute_buckets', 'pump/well/running', new Date(t0 * 1000));
    expect(tenMinutes).toMatchObject({ sample_count: 13, sum: 11, on_seconds: 330, starts: 1 });

    // Day buckets follow the site's local day (America/Denver).
    const { rows } = await sql<{ day: Date }>`
      select date_trunc('day', to_timestamp(${t0}), 'America/Denver') as day`.execute(database.db);
    const day = await bucket('day_buckets', 'pump/well/running', rows[0]!.day);
    expect(day).toMatchObject({ sample_count: 13, on_seconds: 330, starts: 1 });

    const runs = await database.db
      .selectFrom('pump_runs')
      .selectAll()
      .where('pump_id', '=', site.pumpId)
      .execute();
    expect(runs).toHaveLength(1);
    const run = runs[0]!;
    expect(run).toMatchObject({
      site_id: site.siteId,
      started_at: new Date((t0 + 30) * 1000),
      ended_at: new Date((t0 + 360) * 1000),
      duration_s: 330,
      mean_current_a: 6,
      water_source: 'tank_rise',
    });
    expect(run.energy_wh).toBeCloseTo((6 * 25 * 330) / 3600, 6);
    // A 2 m upright cylinder rising 0.30 m: π × 1² × 0.3.
    expect(run.water_m3).toBeCloseTo(Math.PI * 0.3, 3);
  });

  it.each([
    ['ten_minute_buckets', '10 minutes'],
    ['hour_buckets', '1 hour'],
    ['six_hour_buckets', '6 hours'],
  ] as const)(
    'keeps %s equal to an independent aggregate of the raw rows',
    async (table, width) => {
      const { rows } = await sql<{ name: string; ok: boolean }>`
      with raw as (
        select r.channel_id,
               date_bin(${width}::interval, r.time, timestamptz '2000-01-01 00:00:00+00') as period,
               count(*)::int as n, sum(r.value) as s, min(r.value) as lo, max(r.value) as hi,
               min(r.time) as ft, max(r.time) as lt
        from readings r where r.site_id = ${site.siteId} and r.value is not null
        group by 1, 2)
      select c.name, (h.sample_count = raw.n and h.sum = raw.s and h.min = raw.lo and h.max = raw.hi
                      and h.first_time = raw.ft and h.last_time = raw.lt) as ok
      from raw join channels c on c.id = raw.channel_id
      left join ${sql.table(table)} h on h.site_id = ${site.siteId}
        and h.channel_id = raw.channel_id and h.bucket_start = raw.period
      order by c.name`.execute(database.db);
      expect(rows).toEqual([
        { name: 'battery/voltage', ok: true },
        { name: 'pump/well/current', ok: true },
        { name: 'pump/well/running', ok: true },
        { name: 'tank/main/level', ok: true },
      ]);
    },
  );

  it('rolls closed minutes up from raw rows and adds them to hours without counting twice', async () => {
    // Move the watermark back 7 hours: the next sweep rolls those minutes up as if they had
    // just closed (the on-time path), on top of the late-data recomputation done above.
    await sql`update rollup_state set watermark = to_timestamp(${t0 - HOUR})`.execute(database.db);
    await sql`delete from ten_minute_buckets where site_id = ${site.siteId}`.execute(database.db);
    await sql`delete from hour_buckets where site_id = ${site.siteId}`.execute(database.db);
    await sql`delete from six_hour_buckets where site_id = ${site.siteId}`.execute(database.db);
    await sql`delete from day_buckets where site_id = ${site.siteId}`.execute(database.db);
    const sweep = await ingest.sweep();
    expect(sweep.closed?.from).toEqual(new Date((t0 - HOUR) * 1000));
    const hour = await bucket('hour_buckets', 'pump/well/running', new Date((t0 - 600) * 1000));
    expect(hour).toMatchObject({ sample_count: 13, sum: 11, on_seconds: 330, starts: 1 });
    // t0 is ten minutes past the hour: the whole run lies in the ten-minute period starting at t0.
    const tenMinutes = await bucket('ten_minute_buckets', 'pump/well/running', new Date(t0 * 1000));
    expect(tenMinutes).toMatchObject({
      sample_count: 13,
      sum: 11,
      on_seconds: 330,
      starts: 1,
      first_time: new Date(t0 * 1000),
      last_time: new Date((t0 + 360) * 1000),
    });
    const { rows: periods } = await sql<{ start: Date }>`
      select date_bin('6 hours', to_timestamp(${t0}), timestamptz '2000-01-01 00:00:00+00') as start`.execute(
      database.db,
    );
    const quarterDay = await bucket('six_hour_buckets', 'pump/well/running', periods[0]!.start);
    expect(quarterDay).toMatchObject({ sample_count: 13, on_seconds: 330, starts: 1 });
    const runs = await database.db
      .selectFrom('pump_runs')
      .select('duration_s')
      .where('pump_id', '=', site.pumpId)
      .execute();
    expect(runs).toEqual([{ duration_s: 330 }]);
  });
});
