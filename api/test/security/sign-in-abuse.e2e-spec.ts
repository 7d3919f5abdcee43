import { useTestDatabase } from '@wellkept/db/testing';
import { sql } from 'kysely';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createCompany, createUser, TEST_PASSWORD } from '../support/fixtures.js';
import { startTestApp, type TestApp } from '../support/test-app.js';

/**
 * Password guessing: each failure is answered later than the one before, then the account (or
 * the address) is paused with a message that says which and for how long, and never whether
 * the account exists.
 */

const t = useTestDatabase('api_sign_in_abuse');
let app: TestApp;
let companyId: string;

beforeAll(async () => {
  app = await startTestApp(t.url, {
    signInLimits: { perAccount: 3, perAddress: 6, windowSeconds: 600 },
  });
  companyId = await createCompany(t.db);
}, 60_000);
afterAll(async () => app?.close());

const signInAs = (email: string, password: string, address: string) =>
  app.app.inject({
    method: 'POST',
    url: '/api/auth/sign-in',
    payload: { email, password },
    remoteAddress: address,
  });

describe('password guessing', () => {
  it('answers each failure later than the last, then locks the account; the right password waits too', async () => {
    const victim = await createUser(t.db, companyId, 'owner');
    const times: number[] = [];
    for (let i = 0; i < 3; i++) {
      const started = Date.now();
      const res = await signInAs(victim.email, `guess ${i}`, `10.9.0.${i}`);
      times.push(Date.now() - started);
      expect(res.statusCode).toBe(401);
    }
    // 100, 200, 400 ms at least (argon2 adds its own time on top).
    times.forEach((ms, i) => expect(ms).toBeGreaterThanOrEqual(100 * 2 ** i - 5));
    const locked = await signInAs(victim.email, TEST_PASSWORD, '10.9.1.1');
    expect(locked.statusCode).toBe(429);
    expect(locked.json().error.message).toMatch(/^Too many sign-in attempts for this account/);
    expect(locked.cookies.filter((c) => c.value !== '')).toEqual([]);
    // An unknown account is locked the same way, with the same words (nothing to probe).
    for (let i = 0; i < 3; i++) await signInAs('nobody@people.example', `g${i}`, `10.9.2.${i}`);
    const unknown = await signInAs('nobody@people.example', 'x', '10.9.2.9');
    expect(unknown.statusCode).toBe(429);
    expect(unknown.json().error.message).toMatch(/^Too many sign-in attempts for this account/);
    // The pause lifts when the failures leave the window (10 minutes here): age them in the
    // database rather than wait.
    await t.db
      .updateTable('sign_in_attempts')
      .set((eb) => ({ at: sql<Date>`${eb.ref('at')} - interval '601 seconds'` }))
      .where('email', '=', victim.email)
      .execute();
    expect((await signInAs(victim.email, TEST_PASSWORD, '10.9.1.1')).statusCode).toBe(200);
  });

  it('locks an address that sprays many accounts, without locking those accounts elsewhere', async () => {
    const people = await Promise.all(
      Array.from({ length: 6 }, () => createUser(t.db, companyId, 'technician')),
    );
    for (const p of people) {
      expect((await signInAs(p.email, 'Winter2026!', '10.8.0.1')).statusCode).toBe(401);
    }
    const blocked = await signInAs(people[0]!.email, TEST_PASSWORD, '10.8.0.1');
    expect(blocked.statusCode).toBe(429);
    expect(blocked.json().error.message).toMatch(/from your network address/);
    expect((await signInAs(people[1]!.email, TEST_PASSWORD, '10.8.0.2')).statusCode).toBe(200);
  });
});
