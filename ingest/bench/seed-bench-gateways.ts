import { writeFileSync } from 'node:fs';
import { hashGatewaySecret, type DB } from '@wellkept/db';
import { sql, type Kysely } from 'kysely';

/** The one secret every bench gateway uses (throw-away clusters only). */
export const BENCH_GATEWAY_SECRET = 'bench-secret-not-for-production';

/**
 * One company with `count` sites and one gateway each, in one set-based statement, and the
 * gateways' credentials written to `gatewaysFile` for the load generator.
 */
export async function seedBenchGateways(
  db: Kysely<DB>,
  count: number,
  gatewaysFile: string,
): Promise<{ id: string; site_id: string }[]> {
  await sql`
    with c as (insert into companies (name) values ('Bench installer') returning id),
    s as (
      insert into sites (company_id, name, latitude, longitude, time_zone)
      select c.id, 'Bench site ' || g, 10, 10, 'UTC' from c, generate_series(1, ${count}) g
      returning id, name)
    insert into gateways (id, site_id, secret_hash)
    select 'bench-gw-' || lpad(split_part(s.name, ' ', 3), 6, '0'), s.id, ${hashGatewaySecret(BENCH_GATEWAY_SECRET)}
    from s`.execute(db);
  const gateways = await db
    .selectFrom('gateways')
    .select(['id', 'site_id'])
    .orderBy('id')
    .execute();
  writeFileSync(
    gatewaysFile,
    JSON.stringify(gateways.map((g) => ({ id: g.id, secret: BENCH_GATEWAY_SECRET }))),
  );
  return gateways;
}
