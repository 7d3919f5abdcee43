import { type MailCatcher, startMailCatcher, useTestDatabase } from '@wellkept/db/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  cookieHeader,
  createCompany,
  createSite,
  createUser,
  signIn,
  TEST_PASSWORD,
} from './support/fixtures.js';
import { startTestApp, type TestApp } from './support/test-app.js';

const t = useTestDatabase('api_auth');
let app: TestApp;
let mail: MailCatcher;
let companyId: string;
let adminEmail: string;

beforeAll(async () => {
  mail = await startMailCatcher();
  app = await startTestApp(t.url, {
    mail: { ...mail.smtp },
    signInLimits: { perAccount: 3, perAddress: 6, windowSeconds: 600 },
  });
  companyId = await createCompany(t.db);
  adminEmail = (await createUser(t.db, companyId, 'admin')).email;
}, 60_000);
afterAll(async () => {
  await app?.close();
  await mail?.stop();
});

const inject = (opts: Parameters<TestApp['app']['inject']>[0]) => app.app.inject(opts);
const tokenIn = (text: string) => /token=([A-Za-z0-9_-]+)/.exec(text)?.[1] ?? '';

describe('sessions', () => {
  it('signs in with httpOnly, SameSite=Strict cookies; refresh rotates; sign-out ends it', async () => {
    const res = await inject({
      method: 'POST',
      url: '/api/auth/sign-in',
      payload: { email: adminEmail.toUpperCase(), password: TEST_PASSWORD },
      remoteAddress: '10.0.0.1',
    });
    expect(res.statusCode).toBe(200);
    const session = res.cookies.find((c) => c.name === 'wk_session')!;
    const refresh = res.cookies.find((c) => c.name === 'wk_refresh')!;
    expect(session).toMatchObject({ httpOnly: true, sameSite: 'Strict', path: '/' });
    expect(refresh).toMatchObject({ httpOnly: true, sameSite: 'Strict', path: '/api/auth' });
    expect(session.maxAge).toBe(900);

    const renewed = await inject({
      method: 'POST',
      url: '/api/auth/refresh',
      headers: { cookie: `wk_refresh=${refresh.value}` },
    });
    expect(renewed.statusCode).toBe(200);
    const newRefresh = renewed.cookies.find((c) => c.name === 'wk_refresh')!.value;
    expect(newRefresh).not.toBe(refresh.value);
    // The old refresh token was used once; using it again is a theft signal and ends every session.
    const reused = await inject({
      method: 'POST',
      url: '/api/auth/refresh',
      headers: { cookie: `wk_refresh=${refresh.value}` },
    });
    expect(reused.statusCode).toBe(401);
    const afterTheft = await inject({
      method: 'POST',
      url: '/api/auth/refresh',
      headers: { cookie: `wk_refresh=${newRefresh}` },
    });
    expect(afterTheft.statusCode).toBe(401);

    const again = await signIn(app.app, adminEmail);
    const out = await inject({
      method: 'POST',
      url: '/api/auth/sign-out',
      headers: { cookie: again },
    });
    expect(out.statusCode).toBe(204);
    expect(out.cookies.find((c) => c.name === 'wk_session')?.value).toBe('');
    const refreshAfter = await inject({
      method: 'POST',
      url: '/api/auth/refresh',
      headers: { cookie: again },
    });
    expect(refreshAfter.statusCode).toBe(401);
  });

  it('refuses an expired or forged session token', async () => {
    const jwt = app.app.get((await import('@nestjs/jwt')).JwtService);
    const user = await t.db
      .selectFrom('users')
      .select(['id', 'company_id'])
      .where('email', '=', adminEmail)
      .executeTakeFirstOrThrow();
    const expired = await jwt.signAsync(
      { sub: user.id, cid: user.company_id, role: 'admin' },
      { expiresIn: -10 },
    );
    const res = await inject({
      method: 'GET',
      url: '/api/auth/me',
      headers: { cookie: `wk_session=${expired}` },
    });
    expect(res.statusCode).toBe(401);
    const fresh = await jwt.signAsync(
      { sub: user.id, cid: user.company_id, role: 'admin' },
      { expiresIn: 60 },
    );
    expect(
      (
        await inject({
          method: 'GET',
          url: '/api/auth/me',
          headers: { cookie: `wk_session=${fresh}` },
        })
      ).statusCode,
    ).toBe(200);
    const forged = `${fresh.slice(0, -4)}AAAA`;
    expect(
      (
        await inject({
          method: 'GET',
          url: '/api/auth/me',
          headers: { cookie: `wk_session=${forged}` },
        })
      ).statusCode,
    ).toBe(401);
  });

  it('pauses an account after repeated failures with a clear message, per account and per address', async () => {
    const victim = await createUser(t.db, companyId, 'technician');
    for (let i = 0; i < 3; i++) {
      const bad = await inject({
        method: 'POST',
        url: '/api/auth/sign-in',
        payload: { email: victim.email, password: 'wrong password' },
        remoteAddress: `10.1.0.${i}`,
      });
      expect(bad.statusCode).toBe(401);
      expect(bad.json().error.message).toBe('The e-mail address or password is not right');
    }
    const paused = await inject({
      method: 'POST',
      url: '/api/auth/sign-in',
      payload: { email: victim.email, password: TEST_PASSWORD },
      remoteAddress: '10.1.0.9',
    });
    expect(paused.statusCode).toBe(429);
    expect(paused.json().error.message).toMatch(
      /^Too many sign-in attempts for this account; try again in (10|9) minutes$/,
    );

    // Per address: failures against different accounts from one address.
    for (let i = 0; i < 6; i++) {
      await inject({
        method: 'POST',
        url: '/api/auth/sign-in',
        payload: { email: `nobody${i}@people.example`, password: 'x' },
        remoteAddress: '10.2.0.1',
      });
    }
    const fromAddress = await inject({
      method: 'POST',
      url: '/api/auth/sign-in',
      payload: { email: adminEmail, password: TEST_PASSWORD },
      remoteAddress: '10.2.0.1',
    });
    expect(fromAddress.statusCode).toBe(429);
    expect(fromAddress.json().error.message).toContain('from your network address');
    const elsewhere = await inject({
      method: 'POST',
      url: '/api/auth/sign-in',
      payload: { email: adminEmail, password: TEST_PASSWORD },
      remoteAddress: '10.2.0.2',
    });
    expect(elsewhere.statusCode).toBe(200);
    const audit = await t.db
      .selectFrom('audit_log')
      .select('action')
      .where('user_id', '=', victim.id)
      .execute();
    expect(audit.map((a) => a.action)).toEqual([
      'sign_in_failed',
      'sign_in_failed',
      'sign_in_failed',
    ]);
  });
});

describe('invitations and password resets by e-mail', () => {
  it('invites an owner linked to a site; the e-mailed link sets a password once and signs in', async () => {
    const siteId = await createSite(t.db, companyId);
    const admin = await signIn(app.app, adminEmail);
    const email = `owner-${Date.now()}@people.example`;
    const invited = await inject({
      method: 'POST',
      url: '/api/invitations',
      headers: { cookie: admin },
      payload: { email, name: 'Pat Example', role: 'owner', siteIds: [siteId] },
    });
    expect(invited.statusCode).toBe(201);
    const message = await mail.waitFor((m) => m.to.includes(email));
    expect(message.subject).toContain('invited you to Wellkept');
    const token = tokenIn(message.text);
    expect(message.text).toContain(`http://dashboard.test/accept-invitation?token=${token}`);
    const sent = await t.db
      .selectFrom('email_outbox')
      .select(['sent_at', 'category'])
      .where('to_address', '=', email)
      .executeTakeFirstOrThrow();
    expect(sent.category).toBe('invitation');

    const preview = await inject({ method: 'GET', url: `/api/auth/invitations/${token}` });
    expect(preview.json()).toMatchObject({ email, role: 'owner' });
    const accepted = await inject({
      method: 'POST',
      url: '/api/auth/invitations/accept',
      payload: { token, password: 'my own long password' },
    });
    expect(accepted.statusCode).toBe(200);
    expect(accepted.json()).toMatchObject({
      user: { email, role: 'owner', name: 'Pat Example' },
      siteIds: [siteId],
    });
    const me = await inject({
      method: 'GET',
      url: '/api/auth/me',
      headers: { cookie: cookieHeader(accepted.cookies) },
    });
    expect(me.json().user.email).toBe(email);

    const twice = await inject({
      method: 'POST',
      url: '/api/auth/invitations/accept',
      payload: { token, password: 'my own long password' },
    });
    expect(twice.statusCode).toBe(410);
    expect(twice.json().error.message).toBe('This invitation has already been used');
    expect((await signIn(app.app, email, 'my own long password')).length).toBeGreaterThan(0);
  });

  it('refuses an expired invitation with a clear message', async () => {
    const admin = await signIn(app.app, adminEmail);
    const email = `late-${Date.now()}@people.example`;
    await inject({
      method: 'POST',
      url: '/api/invitations',
      headers: { cookie: admin },
      payload: { email, role: 'technician' },
    });
    const token = tokenIn((await mail.waitFor((m) => m.to.includes(email))).text);
    await t.db
      .updateTable('invitations')
      .set({ expires_at: new Date(Date.now() - 1000) })
      .where('email', '=', email)
      .execute();
    const res = await inject({
      method: 'POST',
      url: '/api/auth/invitations/accept',
      payload: { token, password: 'my own long password' },
    });
    expect(res.statusCode).toBe(410);
    expect(res.json().error).toMatchObject({
      code: 'link_expired',
      message: 'This invitation has expired; ask for a new one',
    });
  });

  it('resets a password from the e-mailed link once; the link expires; old sessions end', async () => {
    const user = await createUser(t.db, companyId, 'technician');
    const oldSession = await signIn(app.app, user.email);
    const asked = await inject({
      method: 'POST',
      url: '/api/auth/password-reset',
      payload: { email: user.email },
    });
    expect(asked.statusCode).toBe(202);
    const unknown = await inject({
      method: 'POST',
      url: '/api/auth/password-reset',
      payload: { email: 'no-such-person@people.example' },
    });
    expect(unknown.statusCode).toBe(202);
    expect(unknown.json()).toEqual(asked.json());
    const token = tokenIn(
      (await mail.waitFor((m) => m.to.includes(user.email) && m.subject.includes('Reset'))).text,
    );

    const done = await inject({
      method: 'POST',
      url: '/api/auth/password-reset/confirm',
      payload: { token, password: 'a brand new password' },
    });
    expect(done.statusCode).toBe(204);
    expect(
      (await inject({ method: 'POST', url: '/api/auth/refresh', headers: { cookie: oldSession } }))
        .statusCode,
    ).toBe(401);
    expect(
      (
        await inject({
          method: 'POST',
          url: '/api/auth/sign-in',
          payload: { email: user.email, password: TEST_PASSWORD },
        })
      ).statusCode,
    ).toBe(401);
    await signIn(app.app, user.email, 'a brand new password');
    const again = await inject({
      method: 'POST',
      url: '/api/auth/password-reset/confirm',
      payload: { token, password: 'yet another password' },
    });
    expect(again.statusCode).toBe(410);

    await inject({
      method: 'POST',
      url: '/api/auth/password-reset',
      payload: { email: user.email },
    });
    const second = tokenIn(
      (
        await mail.waitFor(
          (m) =>
            m.to.includes(user.email) && m.subject.includes('Reset') && tokenIn(m.text) !== token,
        )
      ).text,
    );
    await t.db
      .updateTable('password_resets')
      .set({ expires_at: new Date(Date.now() - 1) })
      .where('user_id', '=', user.id)
      .where('used_at', 'is', null)
      .execute();
    const expired = await inject({
      method: 'POST',
      url: '/api/auth/password-reset/confirm',
      payload: { token: second, password: 'yet another password' },
    });
    expect(expired.statusCode).toBe(410);
    expect(expired.json().error.code).toBe('link_expired');
  });

  it('names the field when a body is invalid', async () => {
    const res = await inject({
      method: 'POST',
      url: '/api/auth/sign-in',
      payload: { email: 'not-an-address', password: '' },
    });
    expect(res.statusCode).toBe(400);
    expect(res.json().error.fields).toEqual([
      { path: 'email', message: 'must be an e-mail address' },
      { path: 'password', message: 'must not be empty' },
    ]);
  });

  it('records role changes in the audit log and applies them at once', async () => {
    const admin = await signIn(app.app, adminEmail);
    const tech = await createUser(t.db, companyId, 'technician');
    const techCookie = await signIn(app.app, tech.email);
    expect(
      (await inject({ method: 'GET', url: '/api/users', headers: { cookie: techCookie } }))
        .statusCode,
    ).toBe(403);
    const changed = await inject({
      method: 'PATCH',
      url: `/api/users/${tech.id}`,
      headers: { cookie: admin },
      payload: { role: 'admin' },
    });
    expect(changed.statusCode).toBe(200);
    expect(
      (await inject({ method: 'GET', url: '/api/users', headers: { cookie: techCookie } }))
        .statusCode,
    ).toBe(200);
    const entry = await t.db
      .selectFrom('audit_log')
      .select(['action', 'details'])
      .where('target_id', '=', tech.id)
      .executeTakeFirstOrThrow();
    expect(entry).toEqual({ action: 'role_changed', details: { from: 'technician', to: 'admin' } });
    const deactivated = await inject({
      method: 'POST',
      url: `/api/users/${tech.id}/deactivate`,
      headers: { cookie: admin },
    });
    expect(deactivated.statusCode).toBe(204);
    expect(
      (await inject({ method: 'GET', url: '/api/auth/me', headers: { cookie: techCookie } }))
        .statusCode,
    ).toBe(401);
  });
});
