import { createHmac } from 'node:crypto';
import { useTestDatabase } from '@wellkept/db/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readApiConfig } from '../../src/config/api-config.js';
import {
  cookieHeader,
  createCompany,
  createSite,
  createUser,
  signIn,
  TEST_PASSWORD,
} from '../support/fixtures.js';
import { startTestApp, type TestApp } from '../support/test-app.js';

/**
 * Abuse of the API: password guessing, forged session tokens, cookies, requests from other
 * sites, and the security headers on every answer.
 */

const t = useTestDatabase('api_abuse');
const JWT_SECRET = 'test-secret-test-secret-test-secret-0123';
const PUBLIC_URL = 'http://dashboard.test';
let app: TestApp;
let companyId: string;
let siteId: string;
let technician: { id: string; email: string };
let techCookie: string;

beforeAll(async () => {
  app = await startTestApp(t.url, {
    jwtSecret: JWT_SECRET,
    publicUrl: PUBLIC_URL,
    signInLimits: { perAccount: 3, perAddress: 6, windowSeconds: 600 },
  });
  companyId = await createCompany(t.db);
  siteId = await createSite(t.db, companyId);
  technician = await createUser(t.db, companyId, 'technician');
  techCookie = await signIn(app.app, technician.email);
}, 60_000);
afterAll(async () => app?.close());

const inject = (opts: Parameters<TestApp['app']['inject']>[0]) => app.app.inject(opts);
const signInAs = (email: string, password: string, address: string) =>
  inject({
    method: 'POST',
    url: '/api/auth/sign-in',
    payload: { email, password },
    remoteAddress: address,
  });

/** A JWT signed (or not) by hand, so its header and claims can be anything. */
function jwt(header: object, claims: object, secret: string | null, alg = 'sha256'): string {
  const b64 = (o: object) => Buffer.from(JSON.stringify(o)).toString('base64url');
  const body = `${b64(header)}.${b64(claims)}`;
  const signature = secret === null ? '' : createHmac(alg, secret).update(body).digest('base64url');
  return `${body}.${signature}`;
}

describe('session tokens', () => {
  const now = () => Math.floor(Date.now() / 1000);
  const claims = (extra: object = {}) => ({
    sub: technician.id,
    cid: companyId,
    role: 'technician',
    iss: 'wellkept',
    iat: now(),
    exp: now() + 600,
    ...extra,
  });
  const me = (token: string) =>
    inject({ method: 'GET', url: '/api/auth/me', headers: { cookie: `wk_session=${token}` } });
  const adminOnly = (token: string) =>
    inject({ method: 'GET', url: '/api/users', headers: { cookie: `wk_session=${token}` } });

  it('accepts a correctly signed token (the control case)', async () => {
    expect((await me(jwt({ alg: 'HS256', typ: 'JWT' }, claims(), JWT_SECRET))).statusCode).toBe(
      200,
    );
  });

  it.each([
    ['alg "none", no signature', () => jwt({ alg: 'none', typ: 'JWT' }, claims(), null)],
    ['alg "None"', () => jwt({ alg: 'None', typ: 'JWT' }, claims(), null)],
    ['alg "none" with a signature', () => jwt({ alg: 'none' }, claims(), JWT_SECRET)],
    ['HS512 with the right secret', () => jwt({ alg: 'HS512' }, claims(), JWT_SECRET, 'sha512')],
    [
      'signed with another secret',
      () => jwt({ alg: 'HS256' }, claims(), 'another-secret-another-secret-0000'),
    ],
    [
      'expired',
      () => jwt({ alg: 'HS256' }, claims({ iat: now() - 7200, exp: now() - 3600 }), JWT_SECRET),
    ],
    ['not yet valid', () => jwt({ alg: 'HS256' }, claims({ nbf: now() + 3600 }), JWT_SECRET)],
    ['another issuer', () => jwt({ alg: 'HS256' }, claims({ iss: 'someone-else' }), JWT_SECRET)],
    ['no issuer', () => jwt({ alg: 'HS256' }, claims({ iss: undefined }), JWT_SECRET)],
    [
      'an unknown user',
      () =>
        jwt({ alg: 'HS256' }, claims({ sub: '00000000-0000-4000-8000-000000000000' }), JWT_SECRET),
    ],
    [
      'another company for the user',
      () =>
        jwt({ alg: 'HS256' }, claims({ cid: '00000000-0000-4000-8000-000000000000' }), JWT_SECRET),
    ],
    ['garbage', () => 'not.a.token'],
    ['empty parts', () => '..'],
    ['8 KB of text', () => 'a'.repeat(8000)],
  ])('refuses a token: %s', async (_what, make) => {
    const res = await me(make());
    expect(res.statusCode).toBe(401);
    expect(res.json()).toEqual({
      error: { status: 401, code: 'unauthorized', message: 'Sign in to continue' },
    });
  });

  it('refuses a real token whose role was edited to admin (signature no longer matches)', async () => {
    const real = /wk_session=([^;]+)/.exec(techCookie)![1]!;
    const [h, p, s] = real.split('.');
    const payload = JSON.parse(Buffer.from(p!, 'base64url').toString()) as Record<string, unknown>;
    expect(payload.role).toBe('technician');
    const edited = Buffer.from(JSON.stringify({ ...payload, role: 'admin' })).toString('base64url');
    expect((await adminOnly(real)).statusCode).toBe(403);
    expect((await adminOnly(`${h}.${edited}.${s}`)).statusCode).toBe(401);
    // Even a correctly signed token claiming admin gets the role from the database, not the token.
    const forgedRole = jwt({ alg: 'HS256' }, claims({ role: 'admin' }), JWT_SECRET);
    expect((await adminOnly(forgedRole)).statusCode).toBe(403);
  });
});

describe('cookies', () => {
  it('are httpOnly, SameSite=Strict, and not Secure outside production', async () => {
    const res = await signInAs(technician.email, TEST_PASSWORD, '10.7.0.1');
    expect(res.statusCode).toBe(200);
    for (const name of ['wk_session', 'wk_refresh']) {
      const c = res.cookies.find((x) => x.name === name)!;
      expect(c).toMatchObject({ httpOnly: true, sameSite: 'Strict' });
      expect(c.secure).toBeFalsy();
    }
  });

  it('are Secure when NODE_ENV=production', async () => {
    const config = readApiConfig({
      NODE_ENV: 'production',
      JWT_SECRET: 'a-production-secret-of-forty-characters-x',
      WELLKEPT_DATABASE_URL: t.url,
      DATABASE_URL: t.url,
    });
    expect(config.secureCookies).toBe(true);
    expect(() => readApiConfig({ NODE_ENV: 'production' })).toThrow(/JWT_SECRET: required/);
    const production = await startTestApp(t.url, {
      production: true,
      secureCookies: config.secureCookies,
    });
    try {
      const res = await production.app.inject({
        method: 'POST',
        url: '/api/auth/sign-in',
        payload: { email: technician.email, password: TEST_PASSWORD },
        remoteAddress: '10.7.0.2',
      });
      expect(res.statusCode).toBe(200);
      for (const name of ['wk_session', 'wk_refresh']) {
        expect(res.cookies.find((x) => x.name === name)).toMatchObject({
          httpOnly: true,
          sameSite: 'Strict',
          secure: true,
        });
      }
      const out = await production.app.inject({
        method: 'POST',
        url: '/api/auth/sign-out',
        headers: { cookie: cookieHeader(res.cookies) },
      });
      expect(out.cookies.find((x) => x.name === 'wk_session')).toMatchObject({ secure: true });
    } finally {
      await production.close();
    }
  });
});

describe('requests from other sites', () => {
  const notes = async () =>
    (
      await t.db
        .selectFrom('sites')
        .select('notes')
        .where('id', '=', siteId)
        .executeTakeFirstOrThrow()
    ).notes;

  it.each([
    ['Origin of another site', { origin: 'https://elsewhere.example' }],
    ['Origin "null" (sandboxed page, file:)', { origin: 'null' }],
    ['Origin of a sibling port', { origin: 'http://dashboard.test:8080' }],
    ['Sec-Fetch-Site: cross-site without Origin', { 'sec-fetch-site': 'cross-site' }],
    ['Sec-Fetch-Site: same-site without Origin', { 'sec-fetch-site': 'same-site' }],
  ])('refuses a change with %s and changes nothing', async (_what, headers) => {
    const before = await notes();
    // A technician may not patch a site anyway; the admin below shows the guard comes first.
    const admin = await createUser(t.db, companyId, 'admin');
    const cookie = await signIn(app.app, admin.email);
    const res = await inject({
      method: 'PATCH',
      url: `/api/sites/${siteId}`,
      headers: { cookie, ...headers },
      payload: { notes: 'changed from elsewhere' },
    });
    expect(res.statusCode).toBe(403);
    expect(res.json().error).toMatchObject({ status: 403, code: 'cross_site_request' });
    expect(res.json().error.message).toMatch(/came from another site/);
    expect(await notes()).toBe(before);
  });

  it('refuses a cross-site sign-in, upload and sign-out too', async () => {
    const evil = { origin: 'https://elsewhere.example' };
    const signInRes = await inject({
      method: 'POST',
      url: '/api/auth/sign-in',
      headers: evil,
      payload: { email: technician.email, password: TEST_PASSWORD },
    });
    expect(signInRes.statusCode).toBe(403);
    expect(signInRes.cookies).toEqual([]);
    const out = await inject({
      method: 'POST',
      url: '/api/auth/sign-out',
      headers: { ...evil, cookie: techCookie },
    });
    expect(out.statusCode).toBe(403);
    expect(
      (await inject({ method: 'GET', url: '/api/auth/me', headers: { cookie: techCookie } }))
        .statusCode,
    ).toBe(200);
  });

  it('lets the dashboard itself, same-origin requests and non-browser clients through', async () => {
    const admin = await createUser(t.db, companyId, 'admin');
    const cookie = await signIn(app.app, admin.email);
    const patch = (headers: Record<string, string>, value: string) =>
      inject({
        method: 'PATCH',
        url: `/api/sites/${siteId}`,
        headers: { cookie, ...headers },
        payload: { notes: value },
      });
    expect(
      (await patch({ origin: PUBLIC_URL, 'sec-fetch-site': 'same-site' }, 'one')).statusCode,
    ).toBe(200);
    expect(
      (
        await patch(
          {
            origin: 'http://127.0.0.1:5173',
            host: '127.0.0.1:5173',
            'sec-fetch-site': 'same-origin',
          },
          'two',
        )
      ).statusCode,
    ).toBe(200);
    expect((await patch({}, 'three')).statusCode).toBe(200);
    expect(await notes()).toBe('three');
    // Reading is not a change: a GET from elsewhere is answered (cookies decide who sees what).
    const read = await inject({
      method: 'GET',
      url: `/api/sites/${siteId}`,
      headers: { cookie, origin: 'https://elsewhere.example', 'sec-fetch-site': 'cross-site' },
    });
    expect(read.statusCode).toBe(200);
  });
});

describe('security headers', () => {
  it.each([
    ['a JSON answer', '/api/auth/me'],
    ['an error', '/api/no-such-route'],
    ['the sign-in refusal', '/api/users'],
  ])('are set on %s', async (_what, url) => {
    const res = await inject({ method: 'GET', url, headers: { cookie: techCookie } });
    expect(res.headers).toMatchObject({
      'x-content-type-options': 'nosniff',
      'x-frame-options': 'SAMEORIGIN',
      'referrer-policy': 'no-referrer',
      'cross-origin-opener-policy': 'same-origin',
      'cross-origin-resource-policy': 'same-origin',
      'x-dns-prefetch-control': 'off',
      'x-download-options': 'noopen',
      'x-permitted-cross-domain-policies': 'none',
      'origin-agent-cluster': '?1',
    });
    expect(res.headers['strict-transport-security']).toMatch(/max-age=\d{7,}/);
    expect(res.headers['content-security-policy']).toBe(
      "default-src 'none'; frame-ancestors 'none'",
    );
    expect(res.headers['x-powered-by']).toBeUndefined();
    expect(res.headers['access-control-allow-origin']).toBeUndefined();
  });
});
