import { ALERT_LABELS, type AlertKind, type OutgoingReading } from '@wellkept/core';
import {
  startMailCatcher,
  useTestDatabase,
  type CaughtMail,
  type MailCatcher,
} from '@wellkept/db/testing';
import type { MqttClient } from 'mqtt';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { connectGateway } from '../support/ingest-harness.js';
import { Homestead, type FaultWindow } from './support/homestead-series.js';
import { publishReadings } from './support/publish.js';
import {
  createCompany,
  createPerson,
  createSite,
  FakeClock,
  startRulesApp,
  type Person,
  type RulesApp,
  type TestSite,
} from './support/rules-harness.js';

/**
 * Every alert kind end to end: a simulated homestead per kind, each with its fault switched on
 * for a window, published through the real broker as a gateway would (QoS 1 SenML packs, a
 * backlog after an outage), the rules running on the commits and on the schedule with the
 * clock moved along the simulated days, and the mail read back from the catcher.
 */

const HOUR = 3600;
const database = useTestDatabase('rules_e2e');
// Midnight UTC (5 pm in the sites' Denver time) eight days ago: inside ingest's 30-day window.
const DAY0 = Math.floor(Date.now() / 86_400_000) * 86_400 - 8 * 86_400;
const clock = new FakeClock(DAY0 * 1000);

/** Each kind's fault window, in hours after DAY0 (see homestead-series.ts for the physics). */
const FAULTS: Record<AlertKind, [number, number]> = {
  water_low: [0, 40],
  low_charge: [26, 29],
  overnight_sag: [24, 38],
  float_stuck: [38, 41],
  dry_run: [40, 41],
  short_cycling: [40, 41],
  gateway_silent: [40, 41],
  no_charge: [41, 46],
};
const END_HOURS = 66;
const BACKFILL_HOURS = 20;
const CHUNK_SECONDS = 30 * 60;
const LEAD_IN_CHUNK_SECONDS = 2 * HOUR;

interface Simulated {
  kind: AlertKind;
  site: TestSite;
  owner: Person;
  sim: Homestead;
  client: MqttClient;
  backlog: OutgoingReading[];
}

let catcher: MailCatcher;
let rules: RulesApp;
let admin: Person;
let otherAdmin: Person;
let otherTechnician: Person;
let otherSite: Simulated;
const sims: Simulated[] = [];
const evaluations = new Map<string, number>();
let backfillEvaluations = 0;
let backfillPacks = 0;

async function simulated(
  companyId: string,
  kind: AlertKind | null,
  name: string,
  withOwner = true,
): Promise<Simulated> {
  const site = await createSite(database.db, companyId, { name });
  const owner = withOwner
    ? await createPerson(database.db, companyId, 'owner', {
        sites: [site.id],
        unitSystem: 'metric',
      })
    : { id: '', email: 'nobody@people.wellkept.test', name: '' };
  const faults: FaultWindow[] = kind
    ? [{ kind, startT: DAY0 + FAULTS[kind][0] * HOUR, endT: DAY0 + FAULTS[kind][1] * HOUR }]
    : [];
  const client = await connectGateway(rules.mqttUrl, site);
  return {
    kind: kind ?? 'gateway_silent',
    site,
    owner,
    sim: new Homestead(DAY0, { faults }),
    client,
    backlog: [],
  };
}

/**
 * Runs a site's simulation to `untilT` and publishes what its gateway would send by then, as one
 * pack (so the rules, which look at the clock, never see half a step). While the link is down
 * the gateway keeps its readings and sends them with the first pack after.
 */
async function runTo(s: Simulated, untilT: number): Promise<void> {
  const pack: OutgoingReading[] = [];
  while (s.sim.t < untilT) {
    const readings = s.sim.step();
    if (s.sim.fault('gateway_silent')) {
      s.backlog.push(...readings);
      continue;
    }
    pack.push(...s.backlog.splice(0), ...readings);
  }
  await publishReadings(s.client, s.site.gatewayId, pack);
}

beforeAll(async () => {
  catcher = await startMailCatcher();
  rules = await startRulesApp(database.url, catcher, {
    clock,
    rules: { debounceMs: 100, fullEveryMs: HOUR * 1000 },
  });
  const evaluate = rules.evaluation.evaluate.bind(rules.evaluation);
  rules.evaluation.evaluate = (siteId, kinds) => {
    evaluations.set(siteId, (evaluations.get(siteId) ?? 0) + 1);
    return evaluate(siteId, kinds);
  };
  const company = await createCompany(database.db, 'High Plains Water (test)');
  const other = await createCompany(database.db, 'River Bend Pumps (test)');
  admin = await createPerson(database.db, company.id, 'admin');
  otherAdmin = await createPerson(database.db, other.id, 'admin');
  otherTechnician = await createPerson(database.db, other.id, 'technician');
  for (const kind of Object.keys(FAULTS) as AlertKind[]) {
    sims.push(
      await simulated(company.id, kind, `Homestead with ${ALERT_LABELS[kind].toLowerCase()}`),
    );
  }
  otherSite = await simulated(other.id, null, 'Healthy homestead of another installer');

  // A site of a third installer (nobody to tell) receives a day of back-fill at once, 96
  // quarter-hour packs in flight together, as a gateway sends its store after an outage.
  const lonely = await createCompany(database.db, 'Nobody Listens (test)');
  const backfilled = await simulated(lonely.id, null, 'Back-filled homestead', false);
  clock.set((DAY0 + 24 * HOUR) * 1000);
  const packs: OutgoingReading[][] = [];
  while (backfilled.sim.t < DAY0 + 24 * HOUR) {
    const pack: OutgoingReading[] = [];
    for (let i = 0; i < 15; i++) pack.push(...backfilled.sim.step());
    packs.push(pack);
  }
  backfillPacks = packs.length;
  await Promise.all(
    packs.map((p) => publishReadings(backfilled.client, backfilled.site.gatewayId, p)),
  );
  await rules.scheduler.settled();
  backfillEvaluations = evaluations.get(backfilled.site.id) ?? 0;
  backfilled.client.end(true);
  await database.db.deleteFrom('gateways').where('site_id', '=', backfilled.site.id).execute();

  // The first hours in two-hour steps, then the days go by in half hours: the clock moves,
  // the gateways publish up to it, the debounced rules run on the commits, then the tick.
  for (
    let t = DAY0 + LEAD_IN_CHUNK_SECONDS;
    t <= DAY0 + BACKFILL_HOURS * HOUR;
    t += LEAD_IN_CHUNK_SECONDS
  ) {
    clock.set(t * 1000);
    await Promise.all([...sims, otherSite].map((s) => runTo(s, t)));
    await rules.scheduler.settled();
    await rules.scheduler.tick();
  }
  for (
    let t = DAY0 + BACKFILL_HOURS * HOUR + CHUNK_SECONDS;
    t <= DAY0 + END_HOURS * HOUR;
    t += CHUNK_SECONDS
  ) {
    clock.set(t * 1000);
    await Promise.all([...sims, otherSite].map((s) => runTo(s, t)));
    await rules.scheduler.settled();
    await rules.scheduler.tick();
  }
  await rules.notifier.sweep();
  await rules.sender.trigger();
  await new Promise((r) => setTimeout(r, 500));
}, 600_000);

afterAll(async () => {
  for (const s of [...sims, otherSite]) s?.client.end(true);
  await rules?.close();
  await catcher?.stop();
});

function mailsTo(all: CaughtMail[], p: Person): CaughtMail[] {
  return all.filter((m) => m.to.includes(p.email));
}

describe('alert kinds end to end', () => {
  it('coalesces a back-fill: a day in 96 packs costs a few evaluations, not one per pack', () => {
    expect(backfillPacks).toBe(96);
    expect(backfillEvaluations).toBeGreaterThanOrEqual(1);
    // Usually 2 to 4; the bound leaves room for a busy machine stretching the commits past the
    // debounce window, and still fails if each pack were evaluated on its own.
    expect(backfillEvaluations).toBeLessThanOrEqual(backfillPacks / 8);
  });

  for (const kind of Object.keys(FAULTS) as AlertKind[]) {
    it(`${kind}: opens once, clears when the fault ends, and mails owner and installer once each`, async () => {
      const s = sims.find((x) => x.kind === kind)!;
      const alerts = await database.db
        .selectFrom('alerts')
        .select(['id', 'kind', 'status', 'opened_at', 'cleared_at'])
        .where('site_id', '=', s.site.id)
        .execute();
      expect(alerts.map((a) => [a.kind, a.status])).toEqual([[kind, 'cleared']]);
      const alert = alerts[0]!;
      const [from, to] = FAULTS[kind];
      expect(alert.opened_at.getTime() / 1000).toBeGreaterThanOrEqual(DAY0 + from * HOUR);
      expect(alert.cleared_at!.getTime() / 1000).toBeGreaterThan(DAY0 + to * HOUR - HOUR);
      const events = await database.db
        .selectFrom('alert_events')
        .select('event')
        .where('alert_id', '=', alert.id)
        .orderBy('id')
        .execute();
      expect(events.map((e) => e.event)).toEqual(['opened', 'cleared']);

      const all = await catcher.messages();
      const label = ALERT_LABELS[kind];
      expect(mailsTo(all, s.owner).map((m) => m.subject)).toEqual([
        `${s.site.name}: ${label}`,
        `${s.site.name}: resolved - ${label}`,
      ]);
      const installer = mailsTo(all, admin).filter((m) => m.subject.includes(`${s.site.name}:`));
      expect(installer).toHaveLength(2);
      expect(installer[0]!.subject).toMatch(/^\[(watch|act)\] /);
      expect(installer[1]!.subject).toMatch(/^\[cleared\] /);
      expect(installer[0]!.text).toContain(`/sites/${s.site.id}`);
    });
  }

  it('tells nobody of another installer, and nothing about their healthy site', async () => {
    const all = await catcher.messages();
    expect(mailsTo(all, otherAdmin)).toEqual([]);
    expect(mailsTo(all, otherTechnician)).toEqual([]);
    expect(mailsTo(all, otherSite.owner)).toEqual([]);
    const alerts = await database.db
      .selectFrom('alerts')
      .select('id')
      .where('site_id', '=', otherSite.site.id)
      .execute();
    expect(alerts).toEqual([]);
    // Every message went to company X's admin or an owner of one of its sites.
    const allowed = new Set([admin.email, ...sims.map((s) => s.owner.email)]);
    expect(all.every((m) => m.to.every((a) => allowed.has(a)))).toBe(true);
    expect(all).toHaveLength(8 * 4);
  });
});
