import { useTestDatabase } from '@wellkept/db/testing';
import { hashGatewaySecret, newGatewaySecret } from '@wellkept/db';
import { beforeAll, describe, expect, it } from 'vitest';
import { SiteConfigRepository, type SiteForRules } from '../../src/rules/site-config.repository.js';
import { createCompany, createSite, type TestSite } from './support/homestead-site.js';

const database = useTestDatabase('ingest_site_config');

let companyId = '';
let homestead: TestSite;
let bareSiteId = '';
const rebuiltAt = new Date('2026-02-01T08:30:00Z');

beforeAll(async () => {
  const db = database.db;
  companyId = (await createCompany(db)).id;
  homestead = await createSite(db, companyId, { name: 'Config homestead' });
  const site = homestead.id;

  // Beside the homestead's own equipment: a solar-direct booster with its own array, drawing from
  // the main tank into a pressure tank; a second storage tank lying on its side.
  const main = await db
    .selectFrom('tanks')
    .select('id')
    .where('site_id', '=', site)
    .executeTakeFirstOrThrow();
  const pressure = await db
    .insertInto('tanks')
    .values({
      site_id: site,
      key: 'pressure',
      name: 'Pressure tank',
      kind: 'pressure',
      capacity_m3: 0.08,
      precharge_pa: 190_000,
      cut_in_pa: 210_000,
      cut_out_pa: 340_000,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  await db
    .insertInto('tanks')
    .values({
      site_id: site,
      key: 'spare',
      name: 'Spare tank',
      kind: 'storage',
      geometry: 'horizontal_cylinder',
      diameter_m: 1.2,
      length_m: 3,
      sensor_offset_m: 0.05,
    })
    .execute();
  const booster = await db
    .insertInto('pumps')
    .values({
      site_id: site,
      key: 'booster',
      name: 'House booster',
      kind: 'booster',
      supply: 'pv_direct',
      rated_current_a: 4.5,
      draws_from_tank_id: main.id,
      fills_tank_id: pressure.id,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  await db
    .insertInto('pv_arrays')
    .values({
      site_id: site,
      key: 'booster-array',
      name: 'Booster array',
      rated_w: 600,
      purpose: 'pump_direct',
      pump_id: booster.id,
    })
    .execute();
  await db
    .updateTable('pumps')
    .set({ last_rebuild_at: rebuiltAt, rebuild_interval_h: 20_000 })
    .where('site_id', '=', site)
    .where('key', '=', 'well')
    .execute();
  await db
    .insertInto('gateways')
    .values({
      id: `${homestead.gatewayId}-old`,
      site_id: site,
      secret_hash: hashGatewaySecret(newGatewaySecret()),
      revoked_at: new Date(),
    })
    .execute();
  await db
    .insertInto('alert_settings')
    .values([
      { site_id: site, kind: 'low_charge', enabled: true, params: { socPercent: 40 } },
      { site_id: site, kind: 'short_cycling', enabled: false, params: {} },
    ])
    .execute();

  const bare = await db
    .insertInto('sites')
    .values({
      company_id: companyId,
      name: 'Bare site',
      latitude: -33.9,
      longitude: 18.4,
      time_zone: 'Africa/Johannesburg',
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  bareSiteId = bare.id;
});

describe('SiteConfigRepository.load', () => {
  it("turns a site's rows into core's SiteConfig, settings and names", async () => {
    const loaded = await new SiteConfigRepository(database.db).load([homestead.id]);
    const expected: SiteForRules = {
      id: homestead.id,
      companyId,
      name: 'Config homestead',
      config: {
        timeZone: 'America/Denver',
        location: { latitudeDegrees: 35.4, longitudeDegrees: -107.9, elevationMetres: 2000 },
        battery: { chemistry: 'agm', nominalVolts: 24, capacityAmpHours: 400 },
        // The pump-direct array is judged through its pump, not as charging.
        pvArrays: [{ key: 'house', ratedWatts: 1600, tiltDegrees: 30, azimuthDegrees: 180 }],
        pumps: expect.arrayContaining([
          {
            key: 'well',
            role: 'well',
            ratedCurrentAmps: 8,
            ratedFlowCubicMetresPerSecond: 0.0004,
            ratedWatts: 370,
            fillsTankKey: 'main',
            lastRebuildT: rebuiltAt.getTime() / 1000,
            rebuildIntervalHours: 20_000,
            supply: 'battery',
            supplyVolts: 24,
            pvArrayKey: null,
          },
          {
            key: 'booster',
            role: 'booster',
            ratedCurrentAmps: 4.5,
            ratedFlowCubicMetresPerSecond: null,
            ratedWatts: null,
            fillsTankKey: 'pressure',
            lastRebuildT: null,
            rebuildIntervalHours: null,
            supply: 'pv_direct',
            supplyVolts: null,
            pvArrayKey: 'booster-array',
          },
        ]) as SiteForRules['config']['pumps'],
        // A pressure tank holds no stored water for the rules.
        tanks: expect.arrayContaining([
          {
            key: 'main',
            geometry: { shape: 'vertical_cylinder', diameterMetres: 2, heightMetres: 2 },
            sensorOffsetMetres: 0,
          },
          {
            key: 'spare',
            geometry: { shape: 'horizontal_cylinder', diameterMetres: 1.2, lengthMetres: 3 },
            sensorOffsetMetres: 0.05,
          },
        ]) as SiteForRules['config']['tanks'],
        floatSwitches: [
          { key: 'main-float', tankKey: 'main', pumpKey: 'well', logic: 'closed_calls' },
        ],
        // The revoked gateway is not watched.
        gateways: [{ id: homestead.gatewayId, reportingIntervalSeconds: 60 }],
      },
      overrides: { low_charge: { socPercent: 40 }, short_cycling: {} },
      disabled: new Set(['short_cycling']),
      equipmentNames: new Map([
        ['pump:well', 'Well pump'],
        ['pump:booster', 'House booster'],
        ['tank:main', 'Main tank'],
        ['tank:spare', 'Spare tank'],
        ['float:main-float', 'Main tank float'],
      ]),
    };
    const site = loaded.get(homestead.id);
    expect(site).toEqual(expected);
    expect(site?.config.pumps).toHaveLength(2);
    expect(site?.config.tanks).toHaveLength(2);
  });

  it('loads several sites at once, a site without equipment, and skips unknown ids', async () => {
    const unknown = '00000000-0000-4000-8000-000000000000';
    const loaded = await new SiteConfigRepository(database.db).load([
      bareSiteId,
      homestead.id,
      unknown,
    ]);
    expect([...loaded.keys()].sort()).toEqual([bareSiteId, homestead.id].sort());
    expect(loaded.get(bareSiteId)).toEqual({
      id: bareSiteId,
      companyId,
      name: 'Bare site',
      config: {
        timeZone: 'Africa/Johannesburg',
        location: { latitudeDegrees: -33.9, longitudeDegrees: 18.4, elevationMetres: 0 },
        battery: null,
        pvArrays: [],
        pumps: [],
        tanks: [],
        floatSwitches: [],
        gateways: [],
      },
      overrides: {},
      disabled: new Set(),
      equipmentNames: new Map(),
    });
    // Each site keeps its own equipment when loaded together.
    expect(
      loaded
        .get(homestead.id)
        ?.config.pumps.map((p) => p.key)
        .sort(),
    ).toEqual(['booster', 'well']);
    expect(await new SiteConfigRepository(database.db).load([])).toEqual(new Map());
  });

  it('lists the sites that have a gateway still in service', async () => {
    const ids = await new SiteConfigRepository(database.db).watchedSiteIds();
    expect(ids).toContain(homestead.id);
    expect(ids).not.toContain(bareSiteId);
  });
});
