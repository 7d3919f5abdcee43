import { useTestDatabase } from '@wellkept/db/testing';
import { sql } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createCompany, createSite, createUser, signIn } from './support/fixtures.js';
import { startTestApp, type TestApp } from './support/test-app.js';
import { createChannel } from './support/telemetry.js';

const t = useTestDatabase('api_fleet');
let app: TestApp;
let baseUrl: string;
let admin: string;
let owner: string;
const sites: Record<string, string> = {};

beforeAll(async () => {
  app = await startTestApp(t.url);
  await app.app.listen({ port: 0, host: '127.0.0.1' });
  const address = app.app.getHttpServer().address();
  baseUrl = `http://127.0.0.1:${typeof address === 'object' && address ? address.port : 0}`;
  const company = await createCompany(t.db);
  const now = Date.now();
  for (const name of ['Alder', 'Birch', 'Cedar', 'Dogwood'])
    sites[name] = await createSite(t.db, company, { name });
  // Alder: steady, a 24 V AGM bank at 25.4 V and a 2 m upright tank half full, using 0.2 m a day.
  await t.db
    .insertInto('battery_banks')
    .values({ site_id: sites.Alder!, chemistry: 'agm', nominal_voltage_v: 24, capacity_ah: 400 })
    .execute();
  await t.db
    .insertInto('tanks')
    .values({
      site_id: sites.Alder!,
      key: 'main',
      name: 'Cistern',
      kind: 'storage',
      geometry: 'vertical_cylinder',
      diameter_m: 2,
      height_m: 2,
    })
    .execute();
  const volts = await createChannel(t.db, sites.Alder!, 'battery/voltage', 'V');
  const level = await createChannel(t.db, sites.Alder!, 'tank/main/level', 'm');
  await t.db
    .updateTable('channels')
    .set({ last_time: new Date(now - 60_000), last_value: 25.4 })
    .where('id', '=', volts)
    .execute();
  await t.db
    .updateTable('channels')
    .set({ last_time: new Date(now - 60_000), last_value: 1 })
    .where('id', '=', level)
    .execute();
  // Hourly buckets: voltage for the last 24 hours; the level falls 0.2 m/day over 7 days.
  const hour = 3600_000;
  const top = Math.floor(now / hour) * hour;
  await sql`
    insert into hour_buckets (site_id, channel_id, bucket_start, sample_count, sum, min, max, first_value, first_time, last_value, last_time)
    select ${sites.Alder}::uuid, ${volts}::int, to_timestamp((${top}::float8 - h * 3600000) / 1000.0), 60, 60 * (25 + h / 100.0), 25, 26, 25, now(), 25, now()
      from generate_series(0, 23) h`.execute(t.db);
  await sql`
    insert into hour_buckets (site_id, channel_id, bucket_start, sample_count, sum, min, max, first_value, first_time, last_value, last_time)
    select ${sites.Alder}::uuid, ${level}::int, to_timestamp((${top}::float8 - h * 3600000) / 1000.0), 60, 60, 1, 1,
           1 + 0.2 / 24, now(), 1, now()
      from generate_series(0, 7 * 24 - 1) h`.execute(t.db);
  for (const name of ['Alder', 'Birch', 'Cedar']) {
    await t.db
      .insertInto('gateways')
      .values({
        id: `gw-${name.toLowerCase()}`,
        site_id: sites[name]!,
        secret_hash: 'x',
        last_seen_at: new Date(now - 60_000),
      })
      .execute();
  }
  // Birch: a warning open. Cedar: something to act on. Dogwood: no gateway (silent).
  await t.db
    .insertInto('alerts')
    .values({ site_id: sites.Birch!, kind: 'water_low', severity: 'watch', status: 'open' })
    .execute();
  await t.db
    .insertInto('alerts')
    .values({ site_id: sites.Cedar!, kind: 'dry_run', severity: 'act', status: 'open' })
    .execute();
  admin = await signIn(app.app, (await createUser(t.db, company, 'admin')).email);
  owner = await signIn(
    app.app,
    (await createUser(t.db, company, 'owner', { siteIds: [sites.Birch!] })).email,
  );
});
afterAll(async () => app?.close());

describe('fleet overview', () => {
  it('lists every visible site worst first with health, charge, water and a 24-hour series', async () => {
    const res = await app.app.inject({
      method: 'GET',
      url: '/api/fleet',
      headers: { cookie: admin },
    });
    expect(res.statusCode).toBe(200);
    const body = res.json();
    expect(
      body.sites.map((s: { name: string; health: string }) => `${s.name}:${s.health}`),
    ).toEqual(['Cedar:act', 'Dogwood:silent', 'Birch:watch', 'Alder:steady']);
    expect(body.counts).toEqual({ act: 1, silent: 1, watch: 1, steady: 1 });
    const alder = body.sites[3];
    expect(alder.battery).toMatchObject({ volts: 25.4, confidence: 'wide' });
    expect(alder.battery.stateOfChargePercent).toBeGreaterThan(50);
    // 2π m³ capacity, half full (π m³); 0.2 m/day × π m² = 0.628 m³/day → 5 days.
    expect(alder.water).toMatchObject({ storedM3: 3.142, capacityM3: 6.283, percent: 50 });
    expect(alder.water.daysLeft).toBeCloseTo(5, 1);
    expect(alder.spark.measurement).toBe('battery/voltage');
    expect(alder.spark.values).toHaveLength(24);
    expect(alder.spark.values[23]).toBeCloseTo(25, 6);
    expect(alder.spark.values[0]).toBeCloseTo(25.23, 6);
  });

  it('ranks a site whose gateway went quiet as silent, not act, whatever the alert severity', async () => {
    const alert = await t.db
      .insertInto('alerts')
      .values({ site_id: sites.Alder!, kind: 'gateway_silent', severity: 'act', status: 'open' })
      .returning('id')
      .executeTakeFirstOrThrow();
    try {
      const body = (
        await app.app.inject({ method: 'GET', url: '/api/fleet', headers: { cookie: admin } })
      ).json();
      expect(
        body.sites.map((s: { name: string; health: string }) => `${s.name}:${s.health}`),
      ).toEqual(['Cedar:act', 'Alder:silent', 'Dogwood:silent', 'Birch:watch']);
      expect(body.counts).toEqual({ act: 1, silent: 2, watch: 1, steady: 0 });
      expect(body.sites[1].healthReason).toBe('no recent data');
    } finally {
      await t.db.deleteFrom('alerts').where('id', '=', alert.id).execute();
    }
  });

  it('pages worst first while the counts cover the whole fleet', async () => {
    const res = await app.app.inject({
      method: 'GET',
      url: '/api/fleet?limit=2&offset=1',
      headers: { cookie: admin },
    });
    const body = res.json();
    expect(body.sites.map((s: { name: string }) => s.name)).toEqual(['Dogwood', 'Birch']);
    expect(body.page).toEqual({ limit: 2, offset: 1, total: 4 });
    expect(body.counts).toEqual({ act: 1, silent: 1, watch: 1, steady: 1 });
    expect(body.sites[0].healthReason).toBe('no gateway is set up');
    const bad = await app.app.inject({
      method: 'GET',
      url: '/api/fleet?limit=0',
      headers: { cookie: admin },
    });
    expect(bad.statusCode).toBe(400);
    expect(bad.json().error.fields[0].path).toBe('limit');
  });

  it('shows an owner only the linked site', async () => {
    const res = await app.app.inject({
      method: 'GET',
      url: '/api/fleet',
      headers: { cookie: owner },
    });
    expect(res.json().sites.map((s: { name: string }) => s.name)).toEqual(['Birch']);
  });
});

/** Reads server-sent events until `count` site-update events arrived. */
async function readEvents(url: string, cookie: string, count: number, act: () => Promise<void>) {
  const abort = new AbortController();
  const res = await fetch(`${baseUrl}${url}`, { headers: { cookie }, signal: abort.signal });
  expect(res.headers.get('content-type')).toContain('text/event-stream');
  const reader = res.body!.getReader();
  const events: unknown[] = [];
  let buffer = '';
  await new Promise((r) => setTimeout(r, 100)); // the stream subscribes as it opens
  await act();
  const deadline = Date.now() + 5000;
  while (events.length < count && Date.now() < deadline) {
    const { value, done } = await reader.read();
    if (done) break;
    buffer += new TextDecoder().decode(value);
    for (const block of buffer.split('\n\n').slice(0, -1)) {
      if (block.includes('event: site-update'))
        events.push(JSON.parse(/data: (.*)/.exec(block)![1]!));
    }
    buffer = buffer.slice(buffer.lastIndexOf('\n\n') + 2);
  }
  abort.abort();
  return events;
}

const notify = (siteId: string, what: string) =>
  sql`select pg_notify('site_updates', ${JSON.stringify({ siteId, what: [what], at: new Date().toISOString() })})`.execute(
    t.db,
  );

describe('live updates', () => {
  it('streams NOTIFY site_updates to callers who may see the site, and only them', async () => {
    const ownerEvents = await readEvents('/api/events', owner, 1, async () => {
      await notify(sites.Alder!, 'readings'); // not linked: must not reach the owner
      await notify(sites.Birch!, 'alerts');
    });
    expect(ownerEvents).toEqual([
      { siteId: sites.Birch, what: ['alerts'], at: expect.any(String) },
    ]);

    const siteEvents = await readEvents(`/api/sites/${sites.Cedar}/events`, admin, 1, async () => {
      await notify(sites.Alder!, 'readings');
      await notify(sites.Cedar!, 'pump_runs');
    });
    expect(siteEvents).toEqual([
      { siteId: sites.Cedar, what: ['pump_runs'], at: expect.any(String) },
    ]);
  });

  it('announces an acknowledgement made through the API', async () => {
    const alert = await t.db
      .selectFrom('alerts')
      .select('id')
      .where('site_id', '=', sites.Birch!)
      .executeTakeFirstOrThrow();
    const events = await readEvents('/api/events', admin, 1, async () => {
      const res = await app.app.inject({
        method: 'POST',
        url: `/api/sites/${sites.Birch}/alerts/${alert.id}/acknowledge`,
        headers: { cookie: owner },
        payload: { note: 'Topped up from the neighbour' },
      });
      expect(res.statusCode).toBe(200);
      expect(res.json().history.map((h: { event: string }) => h.event)).toEqual(['acknowledged']);
    });
    expect(events).toEqual([{ siteId: sites.Birch, what: ['alerts'], at: expect.any(String) }]);
  });
});
