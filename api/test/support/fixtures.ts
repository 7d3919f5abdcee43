import argon2 from 'argon2';
import type { Database } from '@wellkept/db';
import type { NestFastifyApplication } from '@nestjs/platform-fastify';

export const TEST_PASSWORD = 'correct horse battery';
let hash: Promise<string> | undefined;
/** One argon2id hash shared by every fixture user (hashing is slow on purpose). */
export function passwordHash(): Promise<string> {
  hash ??= argon2.hash(TEST_PASSWORD, { type: argon2.argon2id });
  return hash;
}

let counter = 0;
const unique = () => `${Date.now().toString(36)}${(counter++).toString(36)}`;

export async function createCompany(db: Database, name = `Company ${unique()}`): Promise<string> {
  const row = await db
    .insertInto('companies')
    .values({ name })
    .returning('id')
    .executeTakeFirstOrThrow();
  return row.id;
}

export async function createUser(
  db: Database,
  companyId: string,
  role: 'admin' | 'technician' | 'owner',
  options: { email?: string; siteIds?: string[]; name?: string } = {},
): Promise<{ id: string; email: string }> {
  const email = options.email ?? `${role}-${unique()}@people.example`;
  const row = await db
    .insertInto('users')
    .values({
      company_id: companyId,
      email,
      name: options.name ?? `${role} ${unique()}`,
      role,
      password_hash: await passwordHash(),
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  await db.insertInto('notification_preferences').values({ user_id: row.id }).execute();
  for (const siteId of options.siteIds ?? []) {
    await db.insertInto('owner_sites').values({ user_id: row.id, site_id: siteId }).execute();
  }
  return { id: row.id, email };
}

export async function createSite(
  db: Database,
  companyId: string,
  options: { name?: string; reportingIntervalS?: number; timeZone?: string } = {},
): Promise<string> {
  const row = await db
    .insertInto('sites')
    .values({
      company_id: companyId,
      name: options.name ?? `Site ${unique()}`,
      latitude: 39.5,
      longitude: -106.2,
      time_zone: options.timeZone ?? 'America/Denver',
      reporting_interval_s: options.reportingIntervalS ?? 30,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  return row.id;
}

/** Signs in through the API and returns the Cookie header for later requests. */
export async function signIn(
  app: NestFastifyApplication,
  email: string,
  password = TEST_PASSWORD,
): Promise<string> {
  const res = await app.inject({
    method: 'POST',
    url: '/api/auth/sign-in',
    payload: { email, password },
  });
  if (res.statusCode !== 200) throw new Error(`sign-in failed: ${res.statusCode} ${res.body}`);
  return cookieHeader(res.cookies);
}

export function cookieHeader(cookies: { name: string; value: string }[]): string {
  return cookies
    .filter((c) => c.value !== '')
    .map((c) => `${c.name}=${c.value}`)
    .join('; ');
}
