import { useTestDatabase } from '@wellkept/db/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signIn } from '../support/fixtures.js';
import { startTestApp, type TestApp } from '../support/test-app.js';
import { type Caller, type Ctx, expectedStatus, ROUTES, type RouteRow } from './route-table.js';
import { type SiteKey, World } from './world.js';

const t = useTestDatabase('api_matrix');
let app: TestApp;
let world: World;
let baseUrl: string;
const registered: { method: string; url: string }[] = [];
const cookies: Record<Caller, string> = { admin: '', technician: '', owner: '', anonymous: '' };
const emails = () => ({
  admin: world.a.admin,
  technician: world.a.technician,
  owner: world.a.owner,
});
const CALLERS: Caller[] = ['anonymous', 'admin', 'technician', 'owner'];

beforeAll(async () => {
  app = await startTestApp(t.url, {}, (route) => registered.push(route));
  world = new World(t.db, app.config.uploads!.dir);
  await world.build();
  for (const role of ['admin', 'technician', 'owner'] as const)
    cookies[role] = await signIn(app.app, emails()[role]);
  await app.app.listen({ port: 0, host: '127.0.0.1' });
  const address = app.app.getHttpServer().address();
  baseUrl = `http://127.0.0.1:${typeof address === 'object' && address ? address.port : 0}`;
}, 120_000);
afterAll(async () => app?.close());

function contexts(row: RouteRow): Pick<Ctx, 'siteKey' | 'tenant'>[] {
  if (row.access.startsWith('site:'))
    return (['linked', 'unlinked', 'other'] as SiteKey[]).map((siteKey) => ({
      siteKey,
      tenant: 'own',
    }));
  if (row.tenantId)
    return [
      { siteKey: 'linked', tenant: 'own' },
      { siteKey: 'linked', tenant: 'other' },
    ];
  return [{ siteKey: 'linked', tenant: 'own' }];
}

async function call(row: RouteRow, caller: Caller, partial: Pick<Ctx, 'siteKey' | 'tenant'>) {
  const ctx: Ctx = { world, site: world.sites[partial.siteKey], ...partial };
  const req = await row.request(ctx);
  let cookie = cookies[caller];
  if (row.freshSession && caller !== 'anonymous') cookie = await signIn(app.app, emails()[caller]);
  const headers = { ...(req.headers ?? {}), ...(cookie ? { cookie } : {}) };
  if (row.stream) {
    // Event streams never end: read the status line, then hang up.
    const abort = new AbortController();
    const res = await fetch(`${baseUrl}${req.url}`, { headers, signal: abort.signal });
    const body = res.status === 200 ? null : await res.json();
    abort.abort();
    return { status: res.status, body };
  }
  const res = await app.app.inject({
    method: row.method,
    url: req.url,
    payload: req.payload as string,
    headers,
  });
  let body: unknown = null;
  try {
    body = res.json();
  } catch {
    body = res.body;
  }
  return { status: res.statusCode, body };
}

describe('authorization matrix', () => {
  it('has a row for every registered route, and every row is a registered route', () => {
    const routes = new Set(
      registered
        .filter((r) => r.method !== 'HEAD' && r.method !== 'OPTIONS')
        .map((r) => `${r.method} ${r.url.replace(/\/$/, '') || '/'}`)
        // Static assets of the OpenAPI page (scripts, styles) are files, not API routes.
        .filter((r) => !/^GET \/api\/docs\/(?!openapi\.json$)/.test(r)),
    );
    const table = new Set(ROUTES.map((r) => `${r.method} ${r.path}`));
    expect(
      [...routes].filter((r) => !table.has(r)),
      'routes without a matrix row',
    ).toEqual([]);
    expect(
      [...table].filter((r) => !routes.has(r)),
      'rows without a route',
    ).toEqual([]);
  });

  for (const row of ROUTES) {
    it(`${row.method} ${row.path} (${row.access})`, async () => {
      const failures: string[] = [];
      for (const partial of contexts(row)) {
        for (const caller of CALLERS) {
          const want = expectedStatus(row, caller, partial);
          const got = await call(row, caller, partial);
          const where = row.access.startsWith('site:')
            ? `${partial.siteKey} site`
            : `${partial.tenant} tenant`;
          if (got.status !== want) {
            failures.push(
              `${caller} on ${where}: got ${got.status}, want ${want} ${JSON.stringify(got.body).slice(0, 200)}`,
            );
          } else if (want >= 400) {
            // Refusals carry the error shape and nothing else (never data).
            const body = got.body as { error?: { status?: number } } | null;
            if (!body?.error || body.error.status !== want || Object.keys(body).length !== 1) {
              failures.push(
                `${caller} on ${where}: refusal is not the error shape: ${JSON.stringify(body).slice(0, 200)}`,
              );
            }
          }
        }
      }
      expect(failures).toEqual([]);
    });
  }
});
