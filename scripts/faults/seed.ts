import argon2 from 'argon2';
import { hashGatewaySecret, newGatewaySecret, type Database } from '@wellkept/db';

/** A gateway the runs connect as, with the site it reports for. */
export interface SeededGateway {
  gatewayId: string;
  secret: string;
  siteId: string;
}

/** A person the runs sign in as (dashboard users) or send mail to. */
export interface SeededPerson {
  userId: string;
  email: string;
  password: string;
}

export const RUN_PASSWORD = 'fault run pass phrase 7';

let passwordHash: Promise<string> | undefined;
function hashOnce(): Promise<string> {
  passwordHash ??= argon2.hash(RUN_PASSWORD, { type: argon2.argon2id });
  return passwordHash;
}

/** Inserts `count` rows in slices (one statement per slice keeps 10,000 sites quick). */
async function inSlices<T>(items: T[], size: number, write: (slice: T[]) => Promise<void>) {
  for (let i = 0; i < items.length; i += size) await write(items.slice(i, i + size));
}

/**
 * A company of `count` sites, each with a 24 V bank, a well pump filling a 2 m upright tank and
 * one gateway (the equipment the telemetry packs name, so pump runs are derived), plus one
 * admin who may see them all. `mailOnAlerts: false` switches that admin's alert mail off
 * (the data sites fall silent by design, since their packs carry old times).
 */
export async function seedFleet(
  db: Database,
  options: {
    tag: string;
    count: number;
    reportingIntervalS?: number;
    withEquipment?: boolean;
    mailOnAlerts?: boolean;
  },
): Promise<{ companyId: string; admin: SeededPerson; gateways: SeededGateway[] }> {
  const company = await db
    .insertInto('companies')
    .values({ name: `Fault run ${options.tag}` })
    .returning('id')
    .executeTakeFirstOrThrow();
  const email = `admin-${options.tag}@fault-run.example`;
  const admin = await db
    .insertInto('users')
    .values({
      company_id: company.id,
      email,
      name: `Admin ${options.tag}`,
      role: 'admin',
      password_hash: await hashOnce(),
      time_zone: 'UTC',
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  await db
    .insertInto('notification_preferences')
    .values({
      user_id: admin.id,
      on_open: options.mailOnAlerts ?? true,
      on_clear: options.mailOnAlerts ?? true,
    })
    .execute();

  const gateways: SeededGateway[] = [];
  const indexes = Array.from({ length: options.count }, (_, i) => i);
  await inSlices(indexes, 1000, async (slice) => {
    const sites = await db
      .insertInto('sites')
      .values(
        slice.map((i) => ({
          company_id: company.id,
          name: `${options.tag} site ${i}`,
          latitude: -25.5,
          longitude: 131,
          time_zone: 'UTC',
          reporting_interval_s: options.reportingIntervalS ?? 30,
        })),
      )
      .returning('id')
      .execute();
    if (options.withEquipment) {
      await db
        .insertInto('battery_banks')
        .values(
          sites.map((s) => ({
            site_id: s.id,
            chemistry: 'agm' as const,
            nominal_voltage_v: 24,
            capacity_ah: 400,
          })),
        )
        .execute();
      const tanks = await db
        .insertInto('tanks')
        .values(
          sites.map((s) => ({
            site_id: s.id,
            key: 'main',
            name: 'Main tank',
            kind: 'storage' as const,
            geometry: 'vertical_cylinder' as const,
            diameter_m: 2,
            height_m: 2,
          })),
        )
        .returning(['id', 'site_id'])
        .execute();
      await db
        .insertInto('pumps')
        .values(
          tanks.map((t) => ({
            site_id: t.site_id,
            key: 'well',
            name: 'Well pump',
            kind: 'well' as const,
            supply: 'battery' as const,
            rated_current_a: 8,
            fills_tank_id: t.id,
          })),
        )
        .execute();
    }
    const rows = sites.map((s, j) => ({
      gatewayId: `gw-${options.tag}-${slice[j]!}`,
      secret: newGatewaySecret(),
      siteId: s.id,
    }));
    await db
      .insertInto('gateways')
      .values(
        rows.map((g) => ({
          id: g.gatewayId,
          site_id: g.siteId,
          secret_hash: hashGatewaySecret(g.secret),
        })),
      )
      .execute();
    gateways.push(...rows);
  });
  return {
    companyId: company.id,
    admin: { userId: admin.id, email, password: RUN_PASSWORD },
    gateways,
  };
}
