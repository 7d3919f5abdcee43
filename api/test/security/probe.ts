import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Database } from '@wellkept/db';
import { sql } from 'kysely';
import { World } from '../authorization/world.js';
import { signIn } from '../support/fixtures.js';
import { startTestApp, type TestApp } from '../support/test-app.js';

/** Helpers shared by the bad-input specs: a world to probe, a database fingerprint, a judge. */

export const UPLOAD_LIMIT = 256 * 1024;

export const SQL_STRINGS = [
  "' or '1'='1",
  "1'; drop table readings; --",
  '1 union select password_hash from users --',
  "'); update users set role='admin' where ('1'='1",
  '${7*7}%00\u0000',
];

/** What must never appear in an answer: SQL, database or stack internals. */
const LEAKS =
  /\b(select|insert|update|delete)\b.*\b(from|into|set)\b|postgres|\bpg_|kysely|syntax error|relation "|column "|violates|stack|at .+\.(ts|js):\d+|node_modules|password_hash|secret_hash/i;

/** Tables a refused request must leave alone (sign-in attempts and the audit log may grow). */
const TABLES = [
  'companies',
  'users',
  'sites',
  'owner_sites',
  'invitations',
  'password_resets',
  'battery_banks',
  'tanks',
  'pumps',
  'pv_arrays',
  'float_switches',
  'wells',
  'gateways',
  'channels',
  'readings',
  'pump_runs',
  'alert_settings',
  'alerts',
  'alert_events',
  'notification_preferences',
  'service_visits',
  'attachments',
];

/** One hash per table of every row's text: equal fingerprints mean nothing changed. */
export async function fingerprint(db: Database): Promise<string> {
  const parts = TABLES.map(
    (table) =>
      sql`select ${table}::text as t, md5(coalesce(string_agg(x::text, '|' order by x::text), '')) as h
          from ${sql.table(table)} x`,
  );
  const { rows } = await sql<{
    t: string;
    h: string;
  }>`${sql.join(parts, sql` union all `)}`.execute(db);
  return rows
    .sort((a, b) => a.t.localeCompare(b.t))
    .map((r) => `${r.t}:${r.h}`)
    .join(',');
}

export interface Answer {
  status: number;
  body: string;
  json: unknown;
}

export interface Probe {
  app: TestApp;
  world: World;
  /** Cookie headers of company A's admin and technician. */
  admin: string;
  technician: string;
  send(
    method: string,
    url: string,
    options?: { payload?: unknown; headers?: Record<string, string>; cookie?: string },
  ): Promise<Answer>;
}

export async function startProbe(db: Database, databaseUrl: string): Promise<Probe> {
  const app = await startTestApp(databaseUrl, {
    uploads: { dir: mkdtempSync(join(tmpdir(), 'wk-bad-input-')), maxBytes: UPLOAD_LIMIT },
  });
  const world = new World(db, app.config.uploads!.dir);
  await world.build();
  const admin = await signIn(app.app, world.a.admin);
  const technician = await signIn(app.app, world.a.technician);
  return {
    app,
    world,
    admin,
    technician,
    async send(method, url, options = {}) {
      const res = await app.app.inject({
        method: method as 'GET',
        url,
        payload: options.payload as string,
        headers: { ...(options.headers ?? {}), cookie: options.cookie ?? admin },
      });
      let json: unknown = null;
      try {
        json = res.json();
      } catch {
        json = null;
      }
      return { status: res.statusCode, body: res.body, json };
    },
  };
}

/**
 * Problems with an answer to bad input: a 5xx, a refusal without the error shape or with too
 * short a message, or internals in the body. The caller's own text echoed back (a message
 * naming the unknown channel it asked for) is not a leak, so it is taken out before looking.
 */
export function judge(
  what: string,
  answer: Answer,
  echoed: readonly string[] = SQL_STRINGS,
): string[] {
  const problems: string[] = [];
  if (answer.status >= 500) problems.push(`${what}: ${answer.status} ${answer.body.slice(0, 160)}`);
  if (answer.status >= 400) {
    const error = (answer.json as { error?: { status?: number; message?: unknown } } | null)?.error;
    if (!error || error.status !== answer.status || typeof error.message !== 'string')
      problems.push(`${what}: refusal without the error shape: ${answer.body.slice(0, 160)}`);
    else if (error.message.length < 10)
      problems.push(`${what}: message too short to help: ${error.message}`);
    let body = answer.body;
    for (const text of echoed) {
      for (const form of [text, JSON.stringify(text).slice(1, -1)])
        body = body.split(form).join('');
    }
    if (LEAKS.test(body)) problems.push(`${what}: leaks ${answer.body.slice(0, 200)}`);
  }
  return problems;
}
