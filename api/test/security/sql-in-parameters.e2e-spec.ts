import { useTestDatabase } from '@wellkept/db/testing';
import { sql } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { type Ctx, type Req, ROUTES, type RouteRow } from '../authorization/route-table.js';
import { fingerprint, judge, type Probe, SQL_STRINGS, startProbe } from './probe.js';

/**
 * SQL-looking strings in every path parameter, query parameter and body field of every route
 * (from the authorization matrix's route table). Every answer is a clear 4xx, or an ordinary
 * success when the text is simply stored as text; never a 5xx; nothing from the inside leaks;
 * a route whose every variant was refused leaves the database exactly as it was.
 */

const t = useTestDatabase('api_sql_params');
let probe: Probe;

beforeAll(async () => {
  probe = await startProbe(t.db, t.url);
}, 120_000);
afterAll(async () => probe?.app.close());

const rows = ROUTES.filter(
  (r) => !r.stream && !r.path.startsWith('/api/docs') && r.path !== '/api/auth/sign-out',
);
const ctx = (): Ctx => ({
  world: probe.world,
  site: probe.world.sites.linked,
  siteKey: 'linked',
  tenant: 'own',
});

interface Variant {
  what: string;
  url: string;
  payload?: unknown;
}

/** One variant per parameter (a different SQL string each time), two per body field (+ NUL). */
function variants(row: RouteRow, req: Req, offset: number): Variant[] {
  const [path, query = ''] = req.url.split('?');
  const template = row.path.split('/');
  const segments = path!.split('/');
  const out: Variant[] = [];
  let k = offset;
  const next = () => SQL_STRINGS[k++ % 4]!;
  template.forEach((part, i) => {
    if (!part.startsWith(':')) return;
    const text = next();
    const copy = [...segments];
    copy[i] = encodeURIComponent(text);
    out.push({
      what: `${part} = ${JSON.stringify(text)}`,
      url: `${copy.join('/')}${query ? `?${query}` : ''}`,
      payload: req.payload,
    });
  });
  const params = new URLSearchParams(query);
  const keys = [...params.keys()];
  if (row.method === 'GET') keys.push('limit', 'cursor');
  for (const key of keys) {
    const text = next();
    const copy = new URLSearchParams(params);
    copy.set(key, text);
    out.push({
      what: `?${key} = ${JSON.stringify(text)}`,
      url: `${path}?${copy.toString()}`,
      payload: req.payload,
    });
  }
  if (req.payload && typeof req.payload === 'object' && !Buffer.isBuffer(req.payload)) {
    for (const key of Object.keys(req.payload)) {
      for (const text of [next(), SQL_STRINGS[4]!]) {
        out.push({
          what: `body.${key} = ${JSON.stringify(text)}`,
          url: req.url,
          payload: { ...(req.payload as object), [key]: text },
        });
      }
    }
  }
  return out;
}

describe('SQL-looking strings in every parameter of every route', () => {
  it('covers the route table', () => {
    expect(rows.length).toBeGreaterThan(40);
  });

  rows.forEach((row, index) => {
    it(`${row.method} ${row.path}`, async () => {
      const req = await row.request(ctx());
      const problems: string[] = [];
      const before = await fingerprint(t.db);
      let accepted = 0;
      for (const v of variants(row, req, index)) {
        const answer = await probe.send(row.method, v.url, {
          payload: v.payload,
          headers: req.headers,
        });
        problems.push(...judge(`${row.method} ${v.url.slice(0, 90)} [${v.what}]`, answer));
        if (answer.status < 400) accepted += 1;
      }
      expect(problems).toEqual([]);
      // Nothing refused may change anything. (An accepted variant stored the text as text.)
      if (accepted === 0) expect(await fingerprint(t.db)).toBe(before);
      const { rows: tables } = await sql<{ n: number }>`
        select count(*)::int as n from information_schema.tables
        where table_schema = 'public' and table_name in ('readings', 'users')`.execute(t.db);
      expect(tables[0]!.n).toBe(2);
    });
  });

  it('stored SQL-looking text verbatim where text is accepted, and no role changed', async () => {
    const { rows: roles } = await sql<{ role: string; n: number }>`
      select role, count(*)::int as n from users group by role order by role`.execute(t.db);
    // The world has 2 admins (one per company); no injection made anyone else an admin.
    expect(roles.find((r) => r.role === 'admin')?.n).toBe(2);
    const { rows: names } = await sql<{ name: string }>`
      select name from companies where id = ${probe.world.a.companyId}`.execute(t.db);
    expect(SQL_STRINGS.slice(0, 4)).toContain(names[0]!.name);
  });
});
