import { startMailCatcher, useTestDatabase, type MailCatcher } from '@wellkept/db/testing';
import type { MqttClient } from 'mqtt';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { connectGateway } from '../support/ingest-harness.js';
import { Homestead } from './support/homestead-series.js';
import { publishReadings } from './support/publish.js';
import {
  createCompany,
  createPerson,
  createSite,
  FakeClock,
  startRulesApp,
  type RulesApp,
} from './support/rules-harness.js';

/**
 * A healthy homestead for a week, through the real broker, with the rules running on every
 * commit and on the schedule (dawn judgements included): nothing opens and no alert mail goes.
 */
const HOUR = 3600;
const database = useTestDatabase('rules_normal_week');
const DAY0 = Math.floor(Date.now() / 86_400_000) * 86_400 - 8 * 86_400;
const clock = new FakeClock(DAY0 * 1000);
let catcher: MailCatcher;
let rules: RulesApp;
let client: MqttClient;
let evaluations = 0;
let overnightJudged = 0;

beforeAll(async () => {
  catcher = await startMailCatcher();
  rules = await startRulesApp(database.url, catcher, { clock, rules: { debounceMs: 50 } });
  const evaluate = rules.evaluation.evaluate.bind(rules.evaluation);
  rules.evaluation.evaluate = (siteId, kinds) => {
    evaluations += 1;
    if (kinds.includes('overnight_sag')) overnightJudged += 1;
    return evaluate(siteId, kinds);
  };
  const company = await createCompany(database.db);
  const site = await createSite(database.db, company.id);
  await createPerson(database.db, company.id, 'admin');
  await createPerson(database.db, company.id, 'technician');
  await createPerson(database.db, company.id, 'owner', { sites: [site.id] });
  client = await connectGateway(rules.mqttUrl, site);
  const sim = new Homestead(DAY0);
  for (let t = DAY0 + 2 * HOUR; t <= DAY0 + 7 * 24 * HOUR; t += 2 * HOUR) {
    clock.set(t * 1000);
    const pack = [];
    while (sim.t < t) pack.push(...sim.step());
    await publishReadings(client, site.gatewayId, pack);
    await rules.scheduler.settled();
    await rules.scheduler.tick();
  }
  await rules.notifier.sweep();
  await rules.sender.trigger();
}, 600_000);

afterAll(async () => {
  client?.end(true);
  await rules?.close();
  await catcher?.stop();
});

describe('a normal week', () => {
  it('opens no alert and sends no alert mail, though the rules ran all week', async () => {
    expect(evaluations).toBeGreaterThan(84);
    expect(overnightJudged).toBeGreaterThanOrEqual(6);
    const alerts = await database.db.selectFrom('alerts').select(['kind', 'summary']).execute();
    expect(alerts).toEqual([]);
    expect(await catcher.messages()).toEqual([]);
    const outbox = await database.db.selectFrom('email_outbox').select('id').execute();
    expect(outbox).toEqual([]);
  });
});
