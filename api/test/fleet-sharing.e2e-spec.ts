import { useTestDatabase } from '@wellkept/db/testing';
import { sql } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createCompany, createSite, createUser, signIn } from './support/fixtures.js';
import { startTestApp, type TestApp } from './support/test-app.js';

const t = useTestDatabase('api_fleet_sharing');
let app: TestApp;
let bigAdmin: string;
let bigTechnician: string;
let smallAdmin: string;
let bigCompany: string;
let smallSite: string;

interface Overview {
  generatedAt: string;
  counts: { act: number; silent: number; watch: number; steady: number };
  page: { total: number };
  sites: { id: string; health: string }[];
}

async function overview(cookie: string): Promise<Overview> {
  const res = await app.app.inject({ method: 'GET', url: '/api/fleet', headers: { cookie } });
  expect(res.statusCode).toBe(200);
  return res.json<Overview>();
}

beforeAll(async () => {
  app = await startTestApp(t.url);
  bigCompany = await createCompany(t.db);
  // 600 sites in one statement (a fleet past the sharing threshold of 500).
  await sql`
    insert into sites (company_id, name, latitude, longitude, elevation_m, time_zone, reporting_interval_s)
    select ${bigCompany}::uuid, 'Ranch ' || g, 35, -107, 1500, 'America/Denver', 60
      from generate_series(1, 600) g`.execute(t.db);
  bigAdmin = await signIn(app.app, (await createUser(t.db, bigCompany, 'admin')).email);
  bigTechnician = await signIn(app.app, (await createUser(t.db, bigCompany, 'technician')).email);
  const small = await createCompany(t.db);
  smallSite = await createSite(t.db, small, { name: 'Lone homestead' });
  smallAdmin = await signIn(app.app, (await createUser(t.db, small, 'admin')).email);
});
afterAll(async () => app?.close());

describe('fleet overview sharing', () => {
  it('shares a large fleet’s overview between its people for about a second, then recomputes', async () => {
    await overview(bigAdmin); // learns the fleet is large
    const first = await overview(bigAdmin);
    expect(first.page.total).toBe(600);
    expect(first.counts.act).toBe(0);
    const someSite = first.sites[0]!.id;
    await t.db
      .insertInto('alerts')
      .values({ site_id: someSite, kind: 'dry_run', severity: 'act', status: 'open' })
      .execute();
    // Within the second: the same answer, for the technician of the same company too.
    const shared = await overview(bigTechnician);
    expect(shared.generatedAt).toBe(first.generatedAt);
    expect(shared.counts.act).toBe(0);
    await new Promise((r) => setTimeout(r, 1100));
    const fresh = await overview(bigAdmin);
    expect(fresh.generatedAt).not.toBe(first.generatedAt);
    expect(fresh.counts.act).toBe(1);
    expect(fresh.sites[0]).toMatchObject({ id: someSite, health: 'act' });
  });

  it('computes a small fleet’s overview for every request (always current)', async () => {
    const before = await overview(smallAdmin);
    expect(before.counts.act).toBe(0);
    await t.db
      .insertInto('alerts')
      .values({ site_id: smallSite, kind: 'dry_run', severity: 'act', status: 'open' })
      .execute();
    const after = await overview(smallAdmin);
    expect(after.counts.act).toBe(1);
  });
});
