import { hashGatewaySecret, newGatewaySecret, type Database } from '@wellkept/db';

/**
 * The homestead of the rules tests as database rows: a company and a site with its equipment
 * and gateway. No test framework here, so the rules benchmark seeds the same site.
 */

let counter = 0;
/** A tag unique in this run, for names, e-mail addresses and gateway ids. */
export function tag(): string {
  counter += 1;
  return `${process.pid}-${counter}-${Math.random().toString(36).slice(2, 6)}`;
}

export interface Company {
  id: string;
  name: string;
}

export async function createCompany(
  db: Database,
  name = `Test installer ${tag()}`,
): Promise<Company> {
  const row = await db
    .insertInto('companies')
    .values({ name })
    .returning('id')
    .executeTakeFirstOrThrow();
  return { id: row.id, name };
}

export interface TestSite {
  id: string;
  name: string;
  gatewayId: string;
  secret: string;
}

/**
 * A site shaped like a small homestead: 24 V AGM bank and a 1.6 kW charging array, a
 * battery-run well pump (8 A) filling a 2 m × 2 m upright tank under a pump-up float.
 */
export async function createSite(
  db: Database,
  companyId: string,
  options: { name?: string; timeZone?: string; latitude?: number; longitude?: number } = {},
): Promise<TestSite> {
  const t = tag();
  const name = options.name ?? `Test homestead ${t}`;
  const site = await db
    .insertInto('sites')
    .values({
      company_id: companyId,
      name,
      latitude: options.latitude ?? 35.4,
      longitude: options.longitude ?? -107.9,
      elevation_m: 2000,
      time_zone: options.timeZone ?? 'America/Denver',
      reporting_interval_s: 60,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  await db
    .insertInto('battery_banks')
    .values({ site_id: site.id, chemistry: 'agm', nominal_voltage_v: 24, capacity_ah: 400 })
    .execute();
  await db
    .insertInto('pv_arrays')
    .values({
      site_id: site.id,
      key: 'house',
      name: 'House array',
      rated_w: 1600,
      purpose: 'battery_charging',
      tilt_deg: 30,
      azimuth_deg: 180,
    })
    .execute();
  const tank = await db
    .insertInto('tanks')
    .values({
      site_id: site.id,
      key: 'main',
      name: 'Main tank',
      kind: 'storage',
      geometry: 'vertical_cylinder',
      diameter_m: 2,
      height_m: 2,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  const pump = await db
    .insertInto('pumps')
    .values({
      site_id: site.id,
      key: 'well',
      name: 'Well pump',
      kind: 'well',
      supply: 'battery',
      rated_current_a: 8,
      rated_flow_m3s: 0.0004,
      motor_power_w: 370,
      fills_tank_id: tank.id,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  await db
    .insertInto('float_switches')
    .values({
      site_id: site.id,
      key: 'main-float',
      name: 'Main tank float',
      tank_id: tank.id,
      pump_id: pump.id,
      logic: 'closes_on_low',
    })
    .execute();
  const secret = newGatewaySecret();
  const gatewayId = `gw-${t}`.toLowerCase().replace(/[^a-z0-9-]/g, '-');
  await db
    .insertInto('gateways')
    .values({ id: gatewayId, site_id: site.id, secret_hash: hashGatewaySecret(secret) })
    .execute();
  return { id: site.id, name, gatewayId, secret };
}
