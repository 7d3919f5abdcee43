import { startMailCatcher, useTestDatabase, type MailCatcher } from '@wellkept/db/testing';
import type { MqttClient } from 'mqtt';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { connectGateway } from '../support/ingest-harness.js';
import { publishReadings } from './support/publish.js';
import {
  FakeClock,
  createCompany,
  createSite,
  startRulesApp,
  type RulesApp,
  type TestSite,
} from './support/rules-harness.js';

const database = useTestDatabase('rules_scheduler');
const clock = new FakeClock(Date.now());
let catcher: MailCatcher;
let rules: RulesApp;
let busy: TestSite;
let quiet: TestSite;
let quietClient: MqttClient;
/** Evaluations that included the data rules, per site and when. */
const dataRuns: { siteId: string; at: number }[] = [];
/** Evaluations of gateway silence alone (the tick's round), per site. */
const silenceRuns: { siteId: string; at: number }[] = [];
/** Sites whose evaluations are only timed, not run. */
const timedOnly = new Set<string>();

beforeAll(async () => {
  catcher = await startMailCatcher();
  // Short ticks; the debounce is longer than the gap between the busy site's commits, so that
  // site is always waiting for an evaluation: the scheduler is never idle.
  rules = await startRulesApp(database.url, catcher, {
    clock,
    rules: { tickMs: 150, debounceMs: 40, minIntervalMs: 300, concurrency: 2 },
  });
  const evaluate = rules.evaluation.evaluate.bind(rules.evaluation);
  rules.evaluation.evaluate = (siteId, kinds) => {
    if (kinds.includes('dry_run')) dataRuns.push({ siteId, at: Date.now() });
    // The sites of the spreading test are only timed (see there), not evaluated.
    if (timedOnly.has(siteId)) return Promise.resolve();
    if (kinds.length === 1 && kinds[0] === 'gateway_silent') {
      silenceRuns.push({ siteId, at: Date.now() });
    }
    return evaluate(siteId, kinds);
  };
  const company = await createCompany(database.db);
  busy = await createSite(database.db, company.id, { name: 'Busy homestead' });
  quiet = await createSite(database.db, company.id, { name: 'Homestead that goes quiet' });
  quietClient = await connectGateway(rules.mqttUrl, quiet);
});

afterAll(async () => {
  quietClient?.end(true);
  await rules?.close();
  await catcher?.stop();
});

async function silentAlert(siteId: string) {
  return database.db
    .selectFrom('alerts')
    .select(['kind', 'status'])
    .where('site_id', '=', siteId)
    .where('kind', '=', 'gateway_silent')
    .executeTakeFirst();
}

describe('the rules scheduler', () => {
  it('judges a gateway silent while another site commits without pause (no starvation)', async () => {
    const nowT = clock.now().getTime() / 1000;
    await publishReadings(quietClient, quiet.gatewayId, [
      { name: 'battery/voltage', t: nowT - 30, value: 25.4 },
    ]);
    // A first round sees the quiet site reporting.
    await rules.scheduler.tick();
    expect(await silentAlert(quiet.id)).toBeUndefined();

    // From now on some site is always debounced or being evaluated, as at a busy fleet.
    const keepBusy = setInterval(() => rules.scheduler.dataArrived(busy.id), 5);
    try {
      // Let rounds start while the fleet is busy: a round that waits for an idle scheduler
      // would now wait for ever, and no later round would come.
      await new Promise((r) => setTimeout(r, 600));
      // The quiet gateway has said nothing for an hour (12 reporting intervals of 60 s and
      // more than the 5 that make it silent). Only a later round of the time-based rules can
      // notice; a round that waited for an idle scheduler would never end and none would come.
      clock.advance(3600_000);
      const deadline = Date.now() + 15_000;
      let alert = await silentAlert(quiet.id);
      while (!alert && Date.now() < deadline) {
        await new Promise((r) => setTimeout(r, 100));
        alert = await silentAlert(quiet.id);
      }
      expect(alert).toEqual({ kind: 'gateway_silent', status: 'open' });
      // And the busy site's own data rules kept running meanwhile (no gateway alert there:
      // it never published, so its gateway has "not reported yet").
      expect(await silentAlert(busy.id)).toBeUndefined();
    } finally {
      clearInterval(keepBusy);
    }
  });

  it("runs a site's data rules at most once per minimum interval, however often it reports", async () => {
    const from = Date.now();
    const keepBusy = setInterval(() => rules.scheduler.dataArrived(busy.id), 5);
    await new Promise((r) => setTimeout(r, 1600));
    clearInterval(keepBusy);
    const runs = dataRuns.filter((r) => r.siteId === busy.id && r.at >= from).map((r) => r.at);
    // 320 reports in 1.6 s; with a 300 ms minimum interval at most 6 runs (one may be due at once).
    expect(runs.length).toBeGreaterThanOrEqual(2);
    expect(runs.length).toBeLessThanOrEqual(7);
    for (let i = 1; i < runs.length; i++)
      expect(runs[i]! - runs[i - 1]!).toBeGreaterThanOrEqual(250);
  });

  it('leaves a site that is surely reporting out of the silence round, and judges it once it is not', async () => {
    const company = await createCompany(database.db);
    const steady = await createSite(database.db, company.id, { name: 'Steady homestead' });
    const client = await connectGateway(rules.mqttUrl, steady);
    try {
      // Back to real time (the first test moved the clock an hour on): ingest refuses readings
      // from more than a few minutes in the future.
      clock.set(Date.now());
      const nowT = clock.now().getTime() / 1000;
      await publishReadings(client, steady.gatewayId, [
        { name: 'battery/voltage', t: nowT - 30, value: 25.4 },
      ]);
      // The channels' newest times are written a few seconds behind the commit.
      const deadline = Date.now() + 15_000;
      const written = () =>
        database.db
          .selectFrom('channels')
          .select('last_time')
          .where('site_id', '=', steady.id)
          .where('last_time', 'is not', null)
          .executeTakeFirst();
      while (!(await written()) && Date.now() < deadline) {
        await new Promise((r) => setTimeout(r, 100));
      }
      expect(await written()).toBeDefined();
      // Its first round was a full evaluation; from then on, rounds every 150 ms.
      await rules.scheduler.tick();
      const from = Date.now();
      await new Promise((r) => setTimeout(r, 1000));
      await rules.scheduler.tick();
      expect(silenceRuns.filter((r) => r.siteId === steady.id && r.at >= from)).toEqual([]);

      // Ten minutes without data (silent after 5 intervals of 60 s), and no full evaluation
      // due for an hour: only the silence round can notice.
      clock.advance(600_000);
      let alert = await silentAlert(steady.id);
      const alertDeadline = Date.now() + 15_000;
      while (!alert && Date.now() < alertDeadline) {
        await new Promise((r) => setTimeout(r, 100));
        alert = await silentAlert(steady.id);
      }
      expect(alert).toEqual({ kind: 'gateway_silent', status: 'open' });
      expect(silenceRuns.some((r) => r.siteId === steady.id)).toBe(true);
    } finally {
      client.end(true);
    }
  });

  it('spreads the data rules of sites that reported together over the following interval', async () => {
    // No time-based rounds meanwhile: they would also ask for these new sites' first full
    // evaluations, which are not what this test times.
    const tick = rules.scheduler.tick.bind(rules.scheduler);
    rules.scheduler.tick = () => Promise.resolve();
    await rules.scheduler.settled();
    const company = await createCompany(database.db);
    const sites: TestSite[] = [];
    for (let i = 0; i < 12; i++) {
      const site = await createSite(database.db, company.id, { name: `Fleet homestead ${i}` });
      timedOnly.add(site.id);
      sites.push(site);
    }
    // When each site's data rules were asked for (the moment it was due, before any queueing
    // behind other sites' evaluations).
    const requested: { siteId: string; at: number }[] = [];
    const request = rules.scheduler.request.bind(rules.scheduler);
    rules.scheduler.request = (siteId, kinds) => {
      if (timedOnly.has(siteId) && kinds.includes('dry_run')) {
        requested.push({ siteId, at: Date.now() });
      }
      request(siteId, kinds);
    };
    // Every site reports every 5 ms, all together (a fleet back after an ingest restart).
    const keepReporting = setInterval(() => {
      for (const site of sites) rules.scheduler.dataArrived(site.id);
    }, 5);
    try {
      await new Promise((r) => setTimeout(r, 1000));
    } finally {
      clearInterval(keepReporting);
      rules.scheduler.request = request;
      rules.scheduler.tick = tick;
    }
    const runsOf = (siteId: string) =>
      requested.filter((r) => r.siteId === siteId).map((r) => r.at);
    const firsts = sites.map((site) => runsOf(site.id)[0]!);
    const seconds = sites.map((site) => runsOf(site.id)[1]!);
    expect(seconds.every((t) => t !== undefined)).toBe(true);
    // The first runs came together, after the debounce ...
    expect(Math.max(...firsts) - Math.min(...firsts)).toBeLessThan(40);
    sites.forEach((_, i) => {
      // ... each second one at least the minimum interval later, and at most half as long again
      // (plus room for a busy machine's timers) ...
      expect(seconds[i]! - firsts[i]!).toBeGreaterThanOrEqual(295);
      expect(seconds[i]! - firsts[i]!).toBeLessThan(450 + 400);
    });
    // ... and not together: spread over more than a sixth of the interval (12 sites due at the
    // same instant would come within a few milliseconds of each other).
    expect(Math.max(...seconds) - Math.min(...seconds)).toBeGreaterThan(50);
  });
});
