import { useTestDatabase } from '@wellkept/db/testing';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createCompany, createSite, createUser, signIn } from './support/fixtures.js';
import { multipart } from './support/multipart.js';
import { startTestApp, type TestApp } from './support/test-app.js';

const t = useTestDatabase('api_csv');
let app: TestApp;
let cookie: string;
let siteId: string;

beforeAll(async () => {
  app = await startTestApp(t.url);
  const company = await createCompany(t.db);
  siteId = await createSite(t.db, company, { timeZone: 'America/Denver' });
  await t.db
    .insertInto('battery_banks')
    .values({ site_id: siteId, chemistry: 'agm', nominal_voltage_v: 24, capacity_ah: 400 })
    .execute();
  cookie = await signIn(app.app, (await createUser(t.db, company, 'technician')).email);
});
afterAll(async () => app?.close());

/** A logger's export: local wall-clock times, level in feet, a pump switch, two bad rows. */
const LOGGER_CSV = [
  'Date Time,Batt V,Tank ft,Pump',
  '2025-03-01 06:00:00,25.10,4.0,0',
  '2025-03-01 06:15:00,25.05,4.1,1',
  '2025-03-01 06:30:00,abc,4.2,1', // line 4: not a number
  '2025-03-01 06:45:00,24.90,,0', // empty cell: that measurement was not logged
  '2025-03-01 25:00:00,24.80,4.3,0', // line 6: impossible hour
  '2025-03-01 07:15:00,95.00,4.4,0', // line 7: implausible for a 24 V bank
].join('\n');
const MAPPING = {
  timeColumn: 'Date Time',
  timeFormat: 'local',
  columns: [
    { column: 'Batt V', measurement: 'battery/voltage' },
    { column: 'Tank ft', measurement: 'tank/main/level', scale: 0.3048 },
    { column: 'Pump', measurement: 'pump/well/running' },
  ],
};

function post(path: string, fields: Record<string, string>, csv: string) {
  const body = multipart(fields, {
    name: 'logger.csv',
    type: 'text/csv',
    content: Buffer.from(csv),
  });
  return app.app.inject({
    method: 'POST',
    url: `/api/sites/${siteId}/imports/${path}`,
    headers: { ...body.headers, cookie },
    payload: body.payload,
  });
}

describe('CSV import', () => {
  it('previews columns, then per-row errors with line numbers', async () => {
    const first = await post('preview', {}, LOGGER_CSV);
    expect(first.statusCode).toBe(200);
    expect(first.json()).toMatchObject({
      columns: ['Date Time', 'Batt V', 'Tank ft', 'Pump'],
      dataRows: 6,
      mapping: null,
    });
    expect(first.json().suggestedMapping).toEqual({
      timeColumn: 'Date Time',
      timeFormat: 'iso',
      columns: [],
    });

    const res = await post('preview', { mapping: JSON.stringify(MAPPING) }, LOGGER_CSV);
    const body = res.json();
    expect(body).toMatchObject({ goodRows: 3, badRows: 3, readings: 8 });
    expect(body.errors).toEqual([
      { line: 4, column: 'Batt V', message: '"abc" is not a number' },
      {
        line: 6,
        column: 'Date Time',
        message: '"2025-03-01 25:00:00" is not a valid date and time',
      },
      { line: 7, column: 'Batt V', message: '95 V is outside the plausible range 0–40 V' },
    ]);
    // 06:00 in Denver (MST, UTC-7) is 13:00 UTC; feet become metres.
    expect(body.sample[0]).toEqual({
      line: 2,
      time: '2025-03-01T13:00:00.000Z',
      values: { 'battery/voltage': 25.1, 'tank/main/level': 4 * 0.3048, 'pump/well/running': 0 },
    });
  });

  it('keeps nothing from a file with bad rows unless the good rows are confirmed', async () => {
    const refused = await post('commit', { mapping: JSON.stringify(MAPPING) }, LOGGER_CSV);
    expect(refused.statusCode).toBe(422);
    expect(refused.json().error.message).toContain('3 rows have errors; nothing was stored');
    expect(refused.json().error.fields[0]).toEqual({
      path: 'line 4, Batt V',
      message: '"abc" is not a number',
    });
    expect(
      await t.db.selectFrom('readings').select('time').where('site_id', '=', siteId).execute(),
    ).toHaveLength(0);

    const done = await post(
      'commit',
      { mapping: JSON.stringify(MAPPING), acceptGoodRows: 'true' },
      LOGGER_CSV,
    );
    expect(done.statusCode).toBe(200);
    expect(done.json()).toMatchObject({ stored: 8, duplicates: 0, goodRows: 3, skippedBadRows: 3 });
    expect(done.json().channelsCreated.sort()).toEqual([
      'battery/voltage',
      'pump/well/running',
      'tank/main/level',
    ]);
    // The same file again stores nothing twice.
    const again = await post(
      'commit',
      { mapping: JSON.stringify(MAPPING), acceptGoodRows: 'true' },
      LOGGER_CSV,
    );
    expect(again.json()).toMatchObject({ stored: 0, duplicates: 8 });
    // Ingest's roll-up is told which minutes to recompute (switch minutes plus the re-scan span).
    const pending = await t.db
      .selectFrom('rollup_pending')
      .select('minute')
      .where('site_id', '=', siteId)
      .execute();
    expect(pending.map((p) => p.minute.toISOString())).toContain('2025-03-01T13:00:00.000Z');
    expect(pending.map((p) => p.minute.toISOString())).toContain('2025-03-01T13:25:00.000Z');
  });

  it('names a mapping that does not fit the file', async () => {
    const bad = { ...MAPPING, columns: [{ column: 'Volts', measurement: 'battery/volts' }] };
    const res = await post('preview', { mapping: JSON.stringify(bad) }, LOGGER_CSV);
    expect(res.statusCode).toBe(400);
    expect(res.json().error.fields).toEqual([
      { path: 'mapping.columns.0.column', message: 'the file has no column "Volts"' },
      {
        path: 'mapping.columns.0.measurement',
        message:
          '"battery/volts" is not a measurement name (e.g. battery/voltage, tank/main/level, pump/well/running)',
      },
    ]);
  });
});

describe('CSV export', () => {
  it('round-trips: the exported readings import back as the same values', async () => {
    const range = '?from=2025-03-01T00:00:00Z&to=2025-03-02T00:00:00Z';
    const exported = await app.app.inject({
      method: 'GET',
      url: `/api/sites/${siteId}/readings.csv${range}`,
      headers: { cookie },
    });
    expect(exported.statusCode).toBe(200);
    expect(exported.headers['content-type']).toBe('text/csv; charset=utf-8');
    const rows = parse(exported.body) as string[][];
    expect(rows[0]).toEqual(['time', 'battery/voltage', 'pump/well/running', 'tank/main/level']);
    expect(rows.slice(1)).toEqual([
      ['2025-03-01T13:00:00.000Z', '25.1', '0', String(4 * 0.3048)],
      ['2025-03-01T13:15:00.000Z', '25.05', '1', String(4.1 * 0.3048)],
      ['2025-03-01T13:45:00.000Z', '24.9', '0', ''],
    ]);

    // Into a second site: the export's header names measurements, so the suggestion maps it all.
    const other = await createSite(
      t.db,
      (
        await t.db
          .selectFrom('sites')
          .select('company_id')
          .where('id', '=', siteId)
          .executeTakeFirstOrThrow()
      ).company_id,
    );
    const preview = await (async () => {
      const body = multipart(
        {},
        { name: 'export.csv', type: 'text/csv', content: Buffer.from(exported.body) },
      );
      return app.app.inject({
        method: 'POST',
        url: `/api/sites/${other}/imports/preview`,
        headers: { ...body.headers, cookie },
        payload: body.payload,
      });
    })();
    const suggested = preview.json().suggestedMapping;
    expect(suggested.columns).toHaveLength(3);
    const body = multipart(
      { mapping: JSON.stringify(suggested) },
      { name: 'export.csv', type: 'text/csv', content: Buffer.from(exported.body) },
    );
    const committed = await app.app.inject({
      method: 'POST',
      url: `/api/sites/${other}/imports/commit`,
      headers: { ...body.headers, cookie },
      payload: body.payload,
    });
    expect(committed.json()).toMatchObject({ stored: 8, skippedBadRows: 0 });
    const back = await app.app.inject({
      method: 'GET',
      url: `/api/sites/${other}/readings.csv${range}`,
      headers: { cookie },
    });
    expect(back.body).toBe(exported.body);
  });

  it('says when a range is older than the raw readings kept, rather than sending an empty file', async () => {
    const res = await app.app.inject({
      method: 'GET',
      url: `/api/sites/${siteId}/readings.csv?from=2024-01-01T00:00:00Z&to=2024-01-02T00:00:00Z`,
      headers: { cookie },
    });
    expect(res.statusCode).toBe(400);
    const { error } = res.json();
    expect(error.code).toBe('raw_readings_not_kept');
    // The readings imported above (1 March 2025) are the oldest kept in this database.
    expect(error.message).toContain('Raw readings before 2025-03-01 are no longer kept');
    expect(error.fields).toEqual([
      { path: 'to', message: 'must be after 2025-03-01, where the raw readings kept begin' },
    ]);
  });

  it('streams pump runs', async () => {
    const pump = await t.db
      .insertInto('pumps')
      .values({
        site_id: siteId,
        key: 'well',
        name: 'Well',
        kind: 'well',
        supply: 'pv_direct',
        rated_current_a: 5,
      })
      .returning('id')
      .executeTakeFirstOrThrow();
    await t.db
      .insertInto('pump_runs')
      .values(
        [0, 1, 2].map((i) => ({
          site_id: siteId,
          pump_id: pump.id,
          started_at: new Date(Date.UTC(2025, 2, 1, 15 + i)),
          ended_at: new Date(Date.UTC(2025, 2, 1, 15 + i, 20)),
          duration_s: 1200,
          energy_wh: 100 + i,
          water_m3: 0.5,
        })),
      )
      .execute();
    const res = await app.app.inject({
      method: 'GET',
      url: `/api/sites/${siteId}/pump-runs.csv`,
      headers: { cookie },
    });
    const rows = parse(res.body) as string[][];
    expect(rows).toHaveLength(4);
    expect(rows[1]).toEqual([
      '2025-03-01T15:00:00.000Z',
      '2025-03-01T15:20:00.000Z',
      'well',
      '1200',
      '100',
      '',
      '0.5',
      '',
      'false',
    ]);
    const page = await app.app.inject({
      method: 'GET',
      url: `/api/sites/${siteId}/pump-runs?limit=2`,
      headers: { cookie },
    });
    expect(page.json().totals).toEqual({ runs: 3, runSeconds: 3600, energyWh: 303, waterM3: 1.5 });
    expect(page.json().runs).toHaveLength(2);
    expect(page.json().nextBefore).toBe('2025-03-01T16:00:00.000Z');
  });
});
