import { mkdirSync, readFileSync, writeFileSync, existsSync } from 'node:fs';
import { dirname, join } from 'node:path';
import argon2 from 'argon2';
import { dataRoot, hashGatewaySecret, newGatewaySecret, type Database } from '@wellkept/db';
import { demoCompany, demoSites, demoUsers } from './scenario.js';

/** Where the demo gateways' secrets are kept for the simulator (git-ignored data folder). */
export function demoGatewaysFile(): string {
  return join(dataRoot(), 'demo-gateways.json');
}

export interface DemoGatewayCredentials {
  siteKey: string;
  siteId: string;
  gatewayId: string;
  secret: string;
}

export interface SeedResult {
  created: boolean;
  companyId: string;
  gateways: DemoGatewayCredentials[];
}

/** Reads the demo gateways' credentials written by the seed. */
export function readDemoGateways(file = demoGatewaysFile()): DemoGatewayCredentials[] {
  if (!existsSync(file)) return [];
  return JSON.parse(readFileSync(file, 'utf8')) as DemoGatewayCredentials[];
}

/**
 * Loads the demo scenario once: the fictional company, its people (one per role, with the
 * printed passwords), its sites with their equipment, and a gateway per site. Running it again
 * leaves existing data alone (and rotates nothing).
 */
export async function seedDemo(
  db: Database,
  gatewaysFile = demoGatewaysFile(),
): Promise<SeedResult> {
  const existing = await db
    .selectFrom('companies')
    .select('id')
    .where('name', '=', demoCompany.name)
    .executeTakeFirst();
  if (existing)
    return { created: false, companyId: existing.id, gateways: readDemoGateways(gatewaysFile) };

  const passwordHashes = await Promise.all(
    demoUsers.map((u) => argon2.hash(u.password, { type: argon2.argon2id })),
  );
  const gateways: DemoGatewayCredentials[] = [];

  const companyId = await db.transaction().execute(async (trx) => {
    const company = await trx
      .insertInto('companies')
      .values(demoCompany)
      .returning('id')
      .executeTakeFirstOrThrow();
    const siteIds = new Map<string, string>();
    for (const s of demoSites) {
      const site = await trx
        .insertInto('sites')
        .values({
          company_id: company.id,
          name: s.name,
          locality: s.locality,
          latitude: s.latitude,
          longitude: s.longitude,
          elevation_m: s.elevationM,
          time_zone: s.timeZone,
          notes: s.notes,
        })
        .returning('id')
        .executeTakeFirstOrThrow();
      siteIds.set(s.key, site.id);
      if (s.battery) {
        await trx
          .insertInto('battery_banks')
          .values({
            site_id: site.id,
            chemistry: s.battery.chemistry,
            nominal_voltage_v: s.battery.nominalVoltageV,
            capacity_ah: s.battery.capacityAh,
            strings: s.battery.strings,
          })
          .execute();
      }
      const tankIds = new Map<string, string>();
      for (const t of s.tanks) {
        const tank = await trx
          .insertInto('tanks')
          .values({
            site_id: site.id,
            key: t.key,
            name: t.name,
            kind: t.kind,
            geometry: t.geometry ?? null,
            diameter_m: t.diameterM ?? null,
            length_m: t.lengthM ?? null,
            width_m: t.widthM ?? null,
            height_m: t.heightM ?? null,
            sensor_offset_m: t.sensorOffsetM ?? 0,
            capacity_m3: t.capacityM3 ?? null,
            precharge_pa: t.prechargePa ?? null,
            cut_in_pa: t.cutInPa ?? null,
            cut_out_pa: t.cutOutPa ?? null,
          })
          .returning('id')
          .executeTakeFirstOrThrow();
        tankIds.set(t.key, tank.id);
      }
      const pumpIds = new Map<string, string>();
      for (const p of s.pumps) {
        const pump = await trx
          .insertInto('pumps')
          .values({
            site_id: site.id,
            key: p.key,
            name: p.name,
            kind: p.kind,
            supply: p.supply,
            rated_current_a: p.ratedCurrentA,
            rated_flow_m3s: p.ratedFlowM3s ?? null,
            motor_power_w: p.motorPowerW ?? null,
            rebuild_interval_h: p.rebuildIntervalH ?? null,
            fills_tank_id: p.fillsTank ? (tankIds.get(p.fillsTank) ?? null) : null,
            draws_from_tank_id: p.drawsFromTank ? (tankIds.get(p.drawsFromTank) ?? null) : null,
          })
          .returning('id')
          .executeTakeFirstOrThrow();
        pumpIds.set(p.key, pump.id);
      }
      for (const a of s.pvArrays) {
        await trx
          .insertInto('pv_arrays')
          .values({
            site_id: site.id,
            key: a.key,
            name: a.name,
            rated_w: a.ratedW,
            purpose: a.purpose,
            pump_id: a.pump ? (pumpIds.get(a.pump) ?? null) : null,
            azimuth_deg: s.latitude >= 0 ? 180 : 0,
          })
          .execute();
      }
      for (const f of s.floats) {
        await trx
          .insertInto('float_switches')
          .values({
            site_id: site.id,
            key: f.key,
            name: f.name,
            tank_id: tankIds.get(f.tank)!,
            pump_id: pumpIds.get(f.pump) ?? null,
            logic: f.logic,
          })
          .execute();
      }
      if (s.well) {
        await trx
          .insertInto('wells')
          .values({
            site_id: site.id,
            depth_m: s.well.depthM,
            casing_diameter_m: s.well.casingDiameterM,
            static_level_m: s.well.staticLevelM,
            pump_setting_m: s.well.pumpSettingM,
          })
          .execute();
      }
      const secret = newGatewaySecret();
      await trx
        .insertInto('gateways')
        .values({
          id: s.gatewayId,
          site_id: site.id,
          name: `${s.name} gateway`,
          secret_hash: hashGatewaySecret(secret),
        })
        .execute();
      gateways.push({ siteKey: s.key, siteId: site.id, gatewayId: s.gatewayId, secret });
    }
    for (const [i, u] of demoUsers.entries()) {
      const user = await trx
        .insertInto('users')
        .values({
          company_id: company.id,
          email: u.email,
          name: u.name,
          role: u.role,
          password_hash: passwordHashes[i]!,
          unit_system: u.unitSystem,
          time_zone: u.timeZone,
        })
        .returning('id')
        .executeTakeFirstOrThrow();
      for (const key of u.sites ?? []) {
        await trx
          .insertInto('owner_sites')
          .values({ user_id: user.id, site_id: siteIds.get(key)! })
          .execute();
      }
      await trx.insertInto('notification_preferences').values({ user_id: user.id }).execute();
    }
    return company.id;
  });

  const file = gatewaysFile;
  mkdirSync(dirname(file), { recursive: true });
  writeFileSync(file, JSON.stringify(gateways, null, 2), { mode: 0o600 });
  return { created: true, companyId, gateways };
}

/** The sign-in details printed by `npm start`. */
export function demoSignInLines(): string[] {
  return demoUsers.map(
    (u) => `  ${u.role.padEnd(10)} ${u.email.padEnd(36)} password: ${u.password}`,
  );
}
