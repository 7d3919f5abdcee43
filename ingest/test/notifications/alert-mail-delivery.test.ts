import type { RuleDecision } from '@wellkept/core';
import {
  startMailCatcher,
  useTestDatabase,
  type CaughtMail,
  type MailCatcher,
} from '@wellkept/db/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  createCompany,
  createPerson,
  createSite,
  FakeClock,
  PUBLIC_URL,
  startRulesApp,
  type Person,
  type RulesApp,
  type TestSite,
} from '../rules/support/rules-harness.js';

const database = useTestDatabase('alert_mail');
let catcher: MailCatcher;
let rules: RulesApp;
const clock = new FakeClock(Date.parse('2026-11-20T18:00:00Z'));
let siteA: TestSite;
let siteB: TestSite;
let siteY: TestSite;
let adminX: Person;
let techX: Person;
let ownerA: Person;
let ownerB: Person;
let adminY: Person;
let techY: Person;
let quietOwner: Person;
let quietSite: TestSite;

beforeAll(async () => {
  catcher = await startMailCatcher();
  rules = await startRulesApp(database.url, catcher, { clock });
  const x = await createCompany(database.db, 'Mesa Pump & Solar (test)');
  const y = await createCompany(database.db, 'Canyon Water Works (test)');
  siteA = await createSite(database.db, x.id, { name: 'Cedar Flat homestead' });
  siteB = await createSite(database.db, x.id, { name: 'Dry Fork cabin' });
  siteY = await createSite(database.db, y.id, { name: 'Sandhill ranch' });
  quietSite = await createSite(database.db, x.id, { name: 'Piñon Ridge house' });
  adminX = await createPerson(database.db, x.id, 'admin', { unitSystem: 'us' });
  techX = await createPerson(database.db, x.id, 'technician', { unitSystem: 'metric' });
  ownerA = await createPerson(database.db, x.id, 'owner', {
    sites: [siteA.id],
    name: 'Alma Reyes',
  });
  ownerB = await createPerson(database.db, x.id, 'owner', { sites: [siteB.id] });
  adminY = await createPerson(database.db, y.id, 'admin');
  techY = await createPerson(database.db, y.id, 'technician');
  quietOwner = await createPerson(database.db, x.id, 'owner', {
    sites: [quietSite.id],
    timeZone: 'America/Denver',
    quietHours: ['22:00', '07:00'],
  });
  // The technician has switched off clear mail; owner B wants only water alerts.
  await database.db
    .insertInto('notification_preferences')
    .values([
      { user_id: techX.id, on_clear: false },
      { user_id: ownerB.id, kinds: ['water_low'] },
    ])
    .execute();
  // Company X's admin and technician hear about the quiet site too; keep them out of that test.
  await database.db
    .insertInto('notification_preferences')
    .values({ user_id: adminX.id, site_ids: [siteA.id, siteB.id] })
    .onConflict((oc) => oc.column('user_id').doUpdateSet({ site_ids: [siteA.id, siteB.id] }))
    .execute();
  await database.db
    .updateTable('notification_preferences')
    .set({ site_ids: [siteA.id, siteB.id] })
    .where('user_id', '=', techX.id)
    .execute();
});

afterAll(async () => {
  await rules?.close();
  await catcher?.stop();
});

const evidence = {
  fromT: Date.parse('2026-11-20T17:40:00Z') / 1000,
  toT: Date.parse('2026-11-20T18:00:00Z') / 1000,
  observed: [
    {
      label: 'Water in storage',
      value: 1.5,
      unit: 'm3' as const,
      t: Date.parse('2026-11-20T17:59:00Z') / 1000,
    },
    { label: 'Days of water left', value: 1.4, unit: 'days' as const },
  ],
  thresholds: [{ label: 'Floor', value: 2, unit: 'days' as const }],
};

function waterLow(action: RuleDecision['action']): RuleDecision {
  return {
    kind: 'water_low',
    subject: 'main',
    action,
    severity: action === 'open' ? 'watch' : null,
    summary:
      action === 'open'
        ? 'Tank main has about 1.4 days of water left at recent use'
        : 'Tank main has about 4.0 days of water left',
    evidence,
  };
}

/** Lets the notifier and the sender finish, then returns every message so far. */
async function delivered(): Promise<CaughtMail[]> {
  await rules.notifier.sweep();
  await rules.sender.trigger();
  await new Promise((r) => setTimeout(r, 200));
  return catcher.messages();
}

function to(mails: CaughtMail[], person: Person): CaughtMail[] {
  return mails.filter((m) => m.to.includes(person.email));
}

describe('alert mail', () => {
  it('mails an opening once to the people of the site and nobody else', async () => {
    await catcher.clear();
    await rules.lifecycle.apply(siteA.id, [waterLow('open')], clock.now());
    await catcher.waitFor((m) => m.to.includes(ownerA.email));
    // Running the notifier again (a restart, a second sweep) writes nothing more.
    await rules.notifier.sweep();
    const mails = await delivered();
    expect(to(mails, adminX)).toHaveLength(1);
    expect(to(mails, techX)).toHaveLength(1);
    expect(to(mails, ownerA)).toHaveLength(1);
    // Owner B is not linked to site A; company Y sees nothing of company X.
    for (const p of [ownerB, adminY, techY, quietOwner]) expect(to(mails, p)).toHaveLength(0);
    expect(mails).toHaveLength(3);
  });

  it('writes plain words for the owner and evidence, numbers and a link for the installer', async () => {
    const mails = await catcher.messages();
    const owner = to(mails, ownerA)[0]!;
    expect(owner.subject).toBe('Cedar Flat homestead: Water low');
    expect(owner.text).toContain('Hello Alma Reyes');
    expect(owner.text).toContain('What it means for your water');
    expect(owner.text).toContain('Mesa Pump & Solar (test)');
    expect(owner.text).not.toMatch(/open (the|your) battery box/i);
    expect(owner.text).not.toContain('Thresholds');
    expect(owner.html).toContain('Mesa Pump &amp; Solar (test)');

    const admin = to(mails, adminX)[0]!;
    expect(admin.subject).toBe('[watch] Cedar Flat homestead: Water low (Main tank)');
    expect(admin.text).toContain(`${PUBLIC_URL}/sites/${siteA.id}`);
    expect(admin.html).toContain(`href="${PUBLIC_URL}/sites/${siteA.id}"`);
    expect(admin.text).toContain('Thresholds');
    expect(admin.text).toContain('The last 24 hours');
    // 1.5 m³ in the reader's units: US gallons for the admin, litres for the technician.
    expect(admin.text).toContain('396\u00a0gal');
    const tech = to(mails, techX)[0]!;
    expect(tech.text).toContain('1,500\u00a0L');
    expect(tech.text).not.toContain('gal');
  });

  it("mails company Y's people about company Y's site, and nobody of company X", async () => {
    await catcher.clear();
    await rules.lifecycle.apply(siteY.id, [waterLow('open')], clock.now());
    await catcher.waitFor((m) => m.to.includes(techY.email));
    const mails = await delivered();
    expect(to(mails, adminY)).toHaveLength(1);
    expect(to(mails, techY)).toHaveLength(1);
    for (const p of [adminX, techX, ownerA, ownerB, quietOwner])
      expect(to(mails, p)).toHaveLength(0);
    expect(mails).toHaveLength(2);
  });

  it('mails the clear to those who asked for clears', async () => {
    await catcher.clear();
    clock.advance(3600_000);
    await rules.lifecycle.apply(siteA.id, [waterLow('clear')], clock.now());
    await catcher.waitFor((m) => m.to.includes(ownerA.email));
    const mails = await delivered();
    expect(to(mails, adminX).map((m) => m.subject)).toEqual([
      '[cleared] Cedar Flat homestead: Water low (Main tank)',
    ]);
    expect(to(mails, ownerA).map((m) => m.subject)).toEqual([
      'Cedar Flat homestead: resolved - Water low',
    ]);
    expect(to(mails, techX)).toHaveLength(0); // on_clear off
    expect(mails).toHaveLength(2);
  });

  it('follows kind preferences: owner B hears of water, not of the battery', async () => {
    await catcher.clear();
    const batteryLow: RuleDecision = {
      kind: 'low_charge',
      subject: '',
      action: 'open',
      severity: 'act',
      summary: 'Battery about 38 % charged, under the 50 % floor',
      evidence,
    };
    await rules.lifecycle.apply(siteB.id, [batteryLow, waterLow('open')], clock.now());
    await catcher.waitFor((m) => m.to.includes(ownerB.email));
    const mails = await delivered();
    expect(to(mails, ownerB).map((m) => m.subject)).toEqual(['Dry Fork cabin: Water low']);
    const battery = to(mails, adminX).find((m) => m.subject.includes('Battery low'))!;
    expect(battery.subject).toBe('[act] Dry Fork cabin: Battery low');
    expect(to(mails, ownerA)).toHaveLength(0);
  });

  it('holds mail in quiet hours and sends one morning summary', async () => {
    await catcher.clear();
    // 23:00 in Denver (UTC−7): inside 22:00–07:00.
    clock.set(Date.parse('2026-11-21T06:00:00Z'));
    await rules.lifecycle.apply(quietSite.id, [waterLow('open')], clock.now());
    clock.set(Date.parse('2026-11-21T09:30:00Z'));
    await rules.lifecycle.apply(quietSite.id, [waterLow('clear')], clock.now());
    expect(to(await delivered(), quietOwner)).toHaveLength(0);
    // 06:59 local: still quiet.
    clock.set(Date.parse('2026-11-21T13:59:00Z'));
    expect(await rules.summaries.run()).toBe(0);
    // 07:01 local: the summary goes out, once.
    clock.set(Date.parse('2026-11-21T14:01:00Z'));
    expect(await rules.summaries.run()).toBe(1);
    expect(await rules.summaries.run()).toBe(0);
    const summary = await catcher.waitFor((m) => m.to.includes(quietOwner.email));
    const mails = to(await delivered(), quietOwner);
    expect(mails).toHaveLength(1);
    expect(summary.subject).toBe('Wellkept: 2 alert changes during your quiet hours');
    expect(summary.text).toContain('Piñon Ridge house');
    expect(summary.text).toContain('The water stored in your tank is running low');
    expect(summary.text).toContain('Your stored water is back to a comfortable level.');
    expect(summary.text).toMatch(/11:00 PM/); // the opening, on the owner's clock
  });
});

describe('an SMTP outage', () => {
  it('delays mail and delivers it exactly once when the server returns, across a restart', async () => {
    const smtpPort = catcher.smtpPort;
    const webPort = catcher.webPort;
    await catcher.clear();
    await catcher.stop();
    clock.set(Date.parse('2026-11-22T18:00:00Z'));
    const noCharge: RuleDecision = {
      kind: 'no_charge',
      subject: '',
      action: 'open',
      severity: 'watch',
      summary: 'Not charging: 2 % of the clear-sky expectation for the last 2 h of daylight',
      evidence,
    };
    await rules.lifecycle.apply(siteA.id, [noCharge], clock.now());
    // Several attempts fail while the catcher is down.
    await new Promise((r) => setTimeout(r, 1200));
    const pending = await database.db
      .selectFrom('email_outbox')
      .select(['attempts', 'sent_at', 'last_error'])
      .where('subject', 'like', '%Not charging%')
      .execute();
    expect(pending).toHaveLength(3);
    expect(pending.every((p) => p.sent_at === null && p.attempts >= 2 && p.last_error)).toBe(true);

    // The service restarts while the server is still down, then the server comes back.
    await rules.close();
    rules = await startRulesApp(
      database.url,
      { smtp: { ...catcher.smtp, port: smtpPort } },
      { clock },
    );
    catcher = await startMailCatcher({ smtpPort, webPort });
    await catcher.waitFor(
      (m) => m.subject.includes('Not charging') && m.to.includes(ownerA.email),
      15_000,
    );
    await new Promise((r) => setTimeout(r, 1000));
    const mails = (await catcher.messages()).filter((m) => m.subject.includes('Not charging'));
    expect(mails.map((m) => m.to[0]).sort()).toEqual(
      [adminX.email, ownerA.email, techX.email].sort(),
    );
    const rows = await database.db
      .selectFrom('email_outbox')
      .select(['sent_at'])
      .where('subject', 'like', '%Not charging%')
      .execute();
    expect(rows.every((r) => r.sent_at !== null)).toBe(true);
  });
});
