import type { RuleDecision } from '@wellkept/core';
import { startMailCatcher, useTestDatabase, type MailCatcher } from '@wellkept/db/testing';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  createCompany,
  createSite,
  startRulesApp,
  type RulesApp,
  type TestSite,
} from './support/rules-harness.js';

const database = useTestDatabase('rules_lifecycle');
let catcher: MailCatcher;
let rules: RulesApp;
let site: TestSite;

beforeAll(async () => {
  catcher = await startMailCatcher();
  rules = await startRulesApp(database.url, catcher);
  const company = await createCompany(database.db);
  site = await createSite(database.db, company.id);
});

afterAll(async () => {
  await rules?.close();
  await catcher?.stop();
});

function decision(
  action: RuleDecision['action'],
  overrides: Partial<RuleDecision> = {},
): RuleDecision {
  return {
    kind: 'dry_run',
    subject: 'well',
    action,
    severity: action === 'open' || action === 'keep' ? 'watch' : null,
    summary: `pump well ${action}`,
    evidence: {
      fromT: 1_700_000_000,
      toT: 1_700_000_300,
      observed: [{ label: 'Mean current', value: 2.1, unit: 'A', t: 1_700_000_200 }],
      thresholds: [{ label: 'Opens below', value: 0.6, unit: 'fraction' }],
    },
    ...overrides,
  };
}

async function alertRows() {
  return database.db
    .selectFrom('alerts')
    .selectAll()
    .where('site_id', '=', site.id)
    .orderBy('opened_at')
    .execute();
}

async function eventRows() {
  return database.db
    .selectFrom('alert_events')
    .select(['event', 'alert_id', 'note', 'evidence', 'user_id'])
    .where('site_id', '=', site.id)
    .orderBy('id')
    .execute();
}

describe('the alert lifecycle', () => {
  it('opens once with its evidence, keeps, escalates, clears and reopens with one history', async () => {
    const t0 = new Date('2026-11-20T10:00:00Z');
    const opened = await rules.lifecycle.apply(site.id, [decision('open')], t0);
    expect(opened.map((c) => c.event)).toEqual(['opened']);
    // The same fault seen again does not open a second alert.
    expect(await rules.lifecycle.apply(site.id, [decision('open')], t0)).toEqual([]);
    expect(await rules.lifecycle.apply(site.id, [decision('keep')], t0)).toEqual([]);
    let alerts = await alertRows();
    expect(alerts).toHaveLength(1);
    expect(alerts[0]).toMatchObject({
      kind: 'dry_run',
      subject: 'well',
      status: 'open',
      severity: 'watch',
    });
    expect(alerts[0]!.evidence).toMatchObject({
      observed: [{ label: 'Mean current', value: 2.1 }],
    });

    // A worse reading raises the severity without a new history row.
    await rules.lifecycle.apply(
      site.id,
      [decision('keep', { severity: 'act', summary: 'worse' })],
      new Date(t0.getTime() + 60_000),
    );
    alerts = await alertRows();
    expect(alerts[0]).toMatchObject({ severity: 'act', summary: 'worse' });
    expect((await eventRows()).map((e) => e.event)).toEqual(['opened']);

    const cleared = await rules.lifecycle.apply(
      site.id,
      [decision('clear', { summary: 'current back to 7.4 A' })],
      new Date(t0.getTime() + 3_600_000),
    );
    expect(cleared.map((c) => c.event)).toEqual(['cleared']);
    alerts = await alertRows();
    expect(alerts[0]).toMatchObject({
      status: 'cleared',
      clear_note: 'current back to 7.4 A',
      cleared_by: null,
    });

    // Back within the reopen window: the same alert reopens, with its count.
    const reopened = await rules.lifecycle.apply(
      site.id,
      [decision('open')],
      new Date(t0.getTime() + 7_200_000),
    );
    expect(reopened.map((c) => c.event)).toEqual(['reopened']);
    alerts = await alertRows();
    expect(alerts).toHaveLength(1);
    expect(alerts[0]).toMatchObject({ status: 'open', reopened_count: 1, cleared_at: null });
    expect((await eventRows()).map((e) => e.event)).toEqual(['opened', 'cleared', 'reopened']);

    // Cleared and back long after the window: a new alert.
    await rules.lifecycle.apply(site.id, [decision('clear')], new Date(t0.getTime() + 8_000_000));
    await rules.lifecycle.apply(
      site.id,
      [decision('open')],
      new Date(t0.getTime() + 8_000_000 + 13 * 3_600_000),
    );
    alerts = await alertRows();
    expect(alerts.map((a) => a.status)).toEqual(['cleared', 'open']);
  });

  it('keeps one open alert when evaluations race', async () => {
    const at = new Date('2026-11-21T10:00:00Z');
    const d = decision('open', { kind: 'short_cycling', subject: 'well' });
    const results = await Promise.all(
      Array.from({ length: 6 }, () => rules.lifecycle.apply(site.id, [d], at)),
    );
    expect(results.flat()).toHaveLength(1);
    const open = (await alertRows()).filter(
      (a) => a.kind === 'short_cycling' && a.status !== 'cleared',
    );
    expect(open).toHaveLength(1);
  });

  it('does not clear or touch what a person already cleared', async () => {
    const at = new Date('2026-11-22T10:00:00Z');
    await rules.lifecycle.apply(
      site.id,
      [decision('open', { kind: 'water_low', subject: 'main' })],
      at,
    );
    const [alert] = (await alertRows()).filter((a) => a.kind === 'water_low');
    await database.db
      .updateTable('alerts')
      .set({ status: 'cleared', cleared_at: at, clear_note: 'tank refilled by hauler' })
      .where('id', '=', alert!.id)
      .execute();
    const changes = await rules.lifecycle.apply(
      site.id,
      [decision('clear', { kind: 'water_low', subject: 'main' })],
      new Date(at.getTime() + 60_000),
    );
    expect(changes).toEqual([]);
    const after = (await alertRows()).find((a) => a.id === alert!.id)!;
    expect(after.clear_note).toBe('tank refilled by hauler');
  });

  it('announces each change on site_updates with what: ["alerts"]', async () => {
    const client = new pg.Client({ connectionString: database.url });
    await client.connect();
    const heard: { siteId: string; what: string[] }[] = [];
    client.on('notification', (n) => heard.push(JSON.parse(n.payload ?? '{}')));
    await client.query('listen site_updates');
    try {
      await rules.lifecycle.apply(
        site.id,
        [decision('open', { kind: 'no_charge', subject: '' })],
        new Date('2026-11-23T18:00:00Z'),
      );
      const deadline = Date.now() + 5000;
      while (!heard.some((h) => h.siteId === site.id) && Date.now() < deadline) {
        await new Promise((r) => setTimeout(r, 20));
      }
      expect(heard).toContainEqual(expect.objectContaining({ siteId: site.id, what: ['alerts'] }));
    } finally {
      await client.end();
    }
  });
});
