import { useTestDatabase } from '@wellkept/db/testing';
import { sql } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createCompany, createSite, createUser, signIn } from './support/fixtures.js';
import { startTestApp, type TestApp } from './support/test-app.js';
import { createChannel, insertRawReadings, rawValue, rollUpAll } from './support/telemetry.js';

const t = useTestDatabase('api_series');
let app: TestApp;
let cookie: string;
let siteId: string;
let companyId: string;
const STEP_S = 300; // the site reports every 5 minutes
const START = new Date('2025-01-01T00:00:00Z');
const COUNT = 40 * 288; // 40 days of readings

beforeAll(async () => {
  app = await startTestApp(t.url);
  const company = await createCompany(t.db);
  companyId = company;
  siteId = await createSite(t.db, company, { reportingIntervalS: STEP_S });
  const admin = await createUser(t.db, company, 'admin');
  const voltage = await createChannel(t.db, siteId, 'battery/voltage', 'V');
  await createChannel(t.db, siteId, 'controller/stage', '', 'string');
  await insertRawReadings(t.db, siteId, voltage, START, COUNT, STEP_S);
  await rollUpAll(t.db, siteId, START, new Date(START.getTime() + COUNT * STEP_S * 1000));
  cookie = await signIn(app.app, admin.email);
});
afterAll(async () => app?.close());

/** Mean/min/max per step computed straight from the generated raw values. */
function expectedFromRaw(from: Date, to: Date, stepS: number) {
  const groups = new Map<number, number[]>();
  for (let i = 0; i < COUNT; i++) {
    const tMs = START.getTime() + i * STEP_S * 1000;
    if (tMs < from.getTime() || tMs >= to.getTime()) continue;
    const key = Math.floor(tMs / 1000 / stepS) * stepS * 1000;
    const list = groups.get(key) ?? [];
    list.push(rawValue(i));
    groups.set(key, list);
  }
  const keys = [...groups.keys()].sort((a, b) => a - b);
  return {
    t: keys,
    mean: keys.map((k) => groups.get(k)!.reduce((a, b) => a + b, 0) / groups.get(k)!.length),
    min: keys.map((k) => Math.min(...groups.get(k)!)),
    max: keys.map((k) => Math.max(...groups.get(k)!)),
  };
}

async function series(from: Date, to: Date, channels = 'battery/voltage', site = siteId) {
  const res = await app.app.inject({
    method: 'GET',
    url: `/api/sites/${site}/series`,
    query: { channels, from: from.toISOString(), to: to.toISOString() },
    headers: { cookie },
  });
  return res;
}

const day = 86400_000;
describe('series resolution', () => {
  it.each([
    ['1 day', 1, 'raw', 300],
    ['7 days', 7, 'ten_minute', 600],
    ['14 days', 14, 'ten_minute', 1200],
    ['28 days', 28, 'ten_minute', 1800],
    ['30 days', 30, 'hour', 3600],
    ['1 year', 365, 'six_hour', 21600],
    ['3 years', 3 * 365, 'day', 86400],
  ] as const)(
    '%s reads %s buckets, %s-second points, whose aggregates equal the raw rows',
    async (_l, days, source, stepS) => {
      const from = new Date(START.getTime() + 2 * day + 7 * 60_000); // deliberately not aligned
      const to = new Date(from.getTime() + days * day);
      const res = await series(from, to);
      expect(res.statusCode).toBe(200);
      const body = res.json();
      expect(body.resolution).toMatchObject({ source, stepSeconds: stepS });
      const [s] = body.series;
      expect(s.t.length).toBeLessThanOrEqual(2000);
      // A bucket is in the range when its start is: compare against the raw rows of those buckets.
      const alignS = {
        raw: 1,
        minute: 60,
        ten_minute: 600,
        hour: 3600,
        six_hour: 21600,
        day: 86400,
      }[source as string]!;
      const ceil = (d: Date) => new Date(Math.ceil(d.getTime() / 1000 / alignS) * alignS * 1000);
      const expected = expectedFromRaw(ceil(from), ceil(to), stepS);
      expect(s.t).toEqual(expected.t);
      // Rows read are the source's own rows (a 7-day chart: 1,008 ten-minute buckets, not 10,080
      // minute buckets).
      expect(body.rowsRead).toBe(expectedFromRaw(ceil(from), ceil(to), alignS).t.length);
      for (let i = 0; i < expected.t.length; i++) {
        expect(s.mean[i]).toBeCloseTo(expected.mean[i]!, 9);
        expect(s.min[i]).toBeCloseTo(expected.min[i]!, 9);
        expect(s.max[i]).toBeCloseTo(expected.max[i]!, 9);
      }
    },
  );

  it('says which channel is unknown and refuses text channels', async () => {
    const from = START;
    const to = new Date(START.getTime() + day);
    const unknown = await series(from, to, 'battery/voltage,pump/main/current');
    expect(unknown.statusCode).toBe(400);
    expect(unknown.json().error.message).toContain('pump/main/current');
    const text = await series(from, to, 'controller/stage');
    expect(text.statusCode).toBe(400);
    expect(text.json().error.code).toBe('text_channel');
  });

  it('names the bad field when the range is backwards or not a date', async () => {
    const backwards = await series(new Date(START.getTime() + day), START);
    expect(backwards.statusCode).toBe(400);
    expect(backwards.json().error.fields).toEqual([{ path: 'from', message: 'must be before to' }]);
    const res = await app.app.inject({
      method: 'GET',
      url: `/api/sites/${siteId}/series?channels=battery/voltage&from=yesterday`,
      headers: { cookie },
    });
    expect(res.statusCode).toBe(400);
    expect(res.json().error.fields[0].path).toBe('from');
  });
});

/**
 * A site with six hours of readings every minute from `start`, rolled up, whose partitions of
 * that time in the given tables are then dropped, as ingest drops them past a retention.
 * Returns the site and the series of hours 1 to 4.
 */
async function oldSiteSeries(start: Date, droppedTables: ('readings' | 'minute_buckets')[]) {
  const oldSite = await createSite(t.db, companyId, { reportingIntervalS: 60 });
  const voltage = await createChannel(t.db, oldSite, 'battery/voltage', 'V');
  await insertRawReadings(t.db, oldSite, voltage, start, 360, 60);
  await rollUpAll(t.db, oldSite, start, new Date(start.getTime() + 6 * 3600_000));
  for (const table of droppedTables) {
    const month = table === 'minute_buckets' ? start.toISOString().slice(0, 8) + '01' : null;
    const partition = `${table}_p${(month ?? start.toISOString().slice(0, 10)).replaceAll('-', '')}`;
    await sql`alter table ${sql.table(table)} detach partition ${sql.table(partition)}`.execute(
      t.db,
    );
    await sql`drop table ${sql.table(partition)}`.execute(t.db);
  }
  const from = new Date(start.getTime() + 3600_000);
  const res = await series(
    from,
    new Date(from.getTime() + 3 * 3600_000),
    'battery/voltage',
    oldSite,
  );
  expect(res.statusCode).toBe(200);
  return { from, body: res.json() };
}

describe('past the retentions', () => {
  it('reads a short range from the minute buckets once its day of raw readings is dropped', async () => {
    // Three hours at one-minute reporting would be 180 raw points: raw is gone, minutes remain.
    const { from, body } = await oldSiteSeries(new Date('2024-06-01T00:00:00Z'), ['readings']);
    expect(body.resolution).toMatchObject({ source: 'minute', stepSeconds: 60 });
    const [s] = body.series;
    expect(s.t).toHaveLength(180);
    expect(s.t[0]).toBe(from.getTime());
    for (let i = 0; i < 180; i++) expect(s.mean[i]).toBeCloseTo(rawValue(60 + i), 9);

    // Where raw readings are still kept, a short range still reads them.
    const kept = await series(START, new Date(START.getTime() + 3 * 3600_000));
    expect(kept.json().resolution).toMatchObject({ source: 'raw', stepSeconds: STEP_S });
  });

  it('reads the ten-minute buckets once the minute buckets of that month are dropped too', async () => {
    const { from, body } = await oldSiteSeries(new Date('2023-03-01T00:00:00Z'), [
      'readings',
      'minute_buckets',
    ]);
    expect(body.resolution).toMatchObject({ source: 'ten_minute', stepSeconds: 600 });
    const [s] = body.series;
    expect(s.t).toHaveLength(18);
    for (let k = 0; k < 18; k++) {
      const values = Array.from({ length: 10 }, (_, j) => rawValue(60 + k * 10 + j));
      expect(s.t[k]).toBe(from.getTime() + k * 600_000);
      expect(s.mean[k]).toBeCloseTo(values.reduce((a, b) => a + b, 0) / 10, 9);
      expect(s.min[k]).toBeCloseTo(Math.min(...values), 9);
      expect(s.max[k]).toBeCloseTo(Math.max(...values), 9);
    }
  });
});
