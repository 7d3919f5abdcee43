import { ensureTimePartitions } from '@wellkept/db';
import { useTestDatabase } from '@wellkept/db/testing';
import { sql } from 'kysely';
import { beforeAll, describe, expect, it } from 'vitest';
import { RuleDataRepository } from '../../src/rules/rule-data.repository.js';

const database = useTestDatabase('ingest_rule_data_series');

const now = new Date('2026-03-10T12:00:00Z');
const nowT = now.getTime() / 1000;
const window = { rawSeconds: 3600, tankSeconds: 4 * 3600, thinSeconds: 600 };
let siteId = '';
let otherSiteId = '';

/** Stores readings of one channel, creating the channel on first use. */
async function store(
  site: string,
  name: string,
  kind: 'number' | 'boolean' | 'string',
  rows: [secondsBeforeNow: number, value: number | string | null][],
): Promise<void> {
  const { rows: channel } = await sql<{ id: number }>`
    insert into channels (site_id, name, unit, value_kind) values (${site}, ${name}, '', ${kind})
    on conflict (site_id, name) do update set value_kind = excluded.value_kind
    returning id`.execute(database.db);
  for (const [ago, value] of rows) {
    const time = new Date((nowT - ago) * 1000);
    await sql`
      insert into readings (site_id, channel_id, time, value, text_value)
      values (${site}, ${channel[0]!.id}, ${time},
              ${typeof value === 'number' ? value : null}, ${typeof value === 'string' ? value : null})`.execute(
      database.db,
    );
  }
}

beforeAll(async () => {
  await ensureTimePartitions(
    database.db,
    'readings',
    new Date(now.getTime() - 2 * 86_400_000),
    new Date(now.getTime() + 86_400_000),
  );
  const { rows } = await sql<{ id: string }>`
    with c as (insert into companies (name) values ('Series test installer') returning id)
    insert into sites (company_id, name, latitude, longitude, time_zone)
    select c.id, n, 35, -106, 'UTC' from c, unnest(array['Series site', 'Other site']) n
    returning id`.execute(database.db);
  [siteId, otherSiteId] = rows.map((r) => r.id) as [string, string];

  // Stored out of time order, as store-and-forward packs arrive.
  await store(siteId, 'battery/voltage', 'number', [
    [60, 25.4],
    [1800, 25.1],
    [30, 25.5],
    [7200, 24.0], // older than the raw window: not read
  ]);
  await store(siteId, 'pump/well/running', 'boolean', [
    [120, 0],
    [90, 1],
    [45, null], // a switch sample without a value is skipped, not read as off
  ]);
  await store(siteId, 'controller/stage', 'string', [
    [300, 'bulk'],
    [100, 'absorption'],
  ]);
  // Tank level: raw in the last hour, one per 10 minutes before it, nothing past four hours.
  await store(siteId, 'tank/cistern/level', 'number', [
    [600, 1.5],
    [3 * 3600 + 540, 1.1],
    [3 * 3600 + 500, 1.15],
    [3 * 3600 + 660, 1.2],
    [5 * 3600, 0.9],
  ]);
  await store(siteId, 'pressure/bladder', 'number', [[5000, 40]]); // only older than the window
  await store(siteId, 'well/level', 'number', [[20, 31.5]]); // recent, but no rule reads it
  await store(otherSiteId, 'battery/voltage', 'number', [[10, 99]]);
});

describe('rule data series', () => {
  it("returns each rule channel's samples in time order, typed by kind, within the window", async () => {
    const series = await new RuleDataRepository(database.db).series(siteId, now, window);
    expect(series['battery/voltage']).toEqual([
      { t: nowT - 1800, v: 25.1 },
      { t: nowT - 60, v: 25.4 },
      { t: nowT - 30, v: 25.5 },
    ]);
    expect(series['pump/well/running']).toEqual([
      { t: nowT - 120, v: false },
      { t: nowT - 90, v: true },
    ]);
    expect(series['controller/stage']).toEqual([
      { t: nowT - 300, v: 'bulk' },
      { t: nowT - 100, v: 'absorption' },
    ]);
    expect(series).not.toHaveProperty('pressure/bladder');
    expect(series).not.toHaveProperty('well/level');
  });

  it('thins older tank levels to one per interval and keeps them before the raw ones', async () => {
    const series = await new RuleDataRepository(database.db).series(siteId, now, window);
    const levels = series['tank/cistern/level'] ?? [];
    expect(levels.map((s) => s.t)).toEqual([...levels.map((s) => s.t)].sort((a, b) => a - b));
    // Two samples of one 10-minute bin three hours back became one; the 5-hour-old one is out.
    expect(levels).toHaveLength(3);
    expect(levels.at(-1)).toEqual({ t: nowT - 600, v: 1.5 });
    expect(levels.some((s) => s.v === 0.9)).toBe(false);
  });

  it("never returns another site's samples", async () => {
    const other = await new RuleDataRepository(database.db).series(otherSiteId, now, window);
    expect(other).toEqual({ 'battery/voltage': [{ t: nowT - 10, v: 99 }] });
  });
});
