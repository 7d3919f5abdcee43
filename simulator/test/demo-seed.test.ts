import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { useTestDatabase } from '@wellkept/db/testing';
import argon2 from 'argon2';
import { describe, expect, it } from 'vitest';
import { demoSites, demoUsers } from '../src/demo/scenario.js';
import { readDemoGateways, seedDemo } from '../src/demo/seed.js';

const test = useTestDatabase('seed');

describe('the demo scenario', () => {
  it('loads the company, one user per role, every site with equipment and a gateway, once', async () => {
    const file = join(mkdtempSync(join(tmpdir(), 'wk-seed-')), 'gateways.json');
    const first = await seedDemo(test.db, file);
    expect(readDemoGateways(file)).toEqual(first.gateways);
    expect(first.created).toBe(true);
    const again = await seedDemo(test.db, file);
    expect(again.created).toBe(false);
    expect(again.companyId).toBe(first.companyId);

    const users = await test.db
      .selectFrom('users')
      .select(['email', 'role', 'password_hash'])
      .execute();
    expect(new Set(users.map((u) => u.role))).toEqual(new Set(['admin', 'technician', 'owner']));
    for (const u of demoUsers) {
      const row = users.find((r) => r.email === u.email)!;
      expect(row.password_hash).toMatch(/^\$argon2id\$/);
      expect(await argon2.verify(row.password_hash!, u.password)).toBe(true);
    }
    const sites = await test.db.selectFrom('sites').select('name').execute();
    expect(sites).toHaveLength(demoSites.length);
    const gateways = await test.db.selectFrom('gateways').select(['id', 'secret_hash']).execute();
    expect(gateways).toHaveLength(demoSites.length);
    for (const g of first.gateways) {
      expect(gateways.find((r) => r.id === g.gatewayId)?.secret_hash).not.toContain(g.secret);
    }
    const links = await test.db.selectFrom('owner_sites').select('site_id').execute();
    expect(links).toHaveLength(demoUsers.reduce((n, u) => n + (u.sites?.length ?? 0), 0));
  });

  it('uses only reserved example domains for e-mail', () => {
    for (const u of demoUsers) expect(u.email).toMatch(/\.example$/);
  });
});
