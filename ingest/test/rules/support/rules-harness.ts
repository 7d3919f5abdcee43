import 'reflect-metadata';
import { FastifyAdapter, type NestFastifyApplication } from '@nestjs/platform-fastify';
import { Test } from '@nestjs/testing';
import { hashGatewaySecret, newGatewaySecret, type Database } from '@wellkept/db';
import type { MailCatcher } from '@wellkept/db/testing';
import { AppModule } from '../../../src/app.module.js';
import { BrokerService } from '../../../src/broker/broker.service.js';
import { createLogger } from '../../../src/logging/logger.js';
import { AlertNotifier } from '../../../src/notifications/alert-notifier.service.js';
import { CLOCK, type Clock } from '../../../src/notifications/clock.js';
import { MAIL_CONFIG, type MailConfig } from '../../../src/notifications/mail-config.js';
import { MorningSummaryService } from '../../../src/notifications/morning-summary.service.js';
import { NotificationsModule } from '../../../src/notifications/notifications.module.js';
import { OutboxSenderService } from '../../../src/notifications/outbox-sender.service.js';
import { AlertLifecycleService } from '../../../src/rules/alert-lifecycle.service.js';
import { RULES_CONFIG, type RulesConfig } from '../../../src/rules/rules-config.js';
import { RulesEvaluationService } from '../../../src/rules/rules-evaluation.service.js';
import { RulesModule } from '../../../src/rules/rules.module.js';
import { RulesSchedulerService } from '../../../src/rules/rules-scheduler.service.js';
import { RollupService } from '../../../src/storage/rollup.service.js';
import { testConfig } from '../../support/ingest-harness.js';

/** A clock the test moves by hand. */
export class FakeClock implements Clock {
  constructor(private t: number) {}
  now(): Date {
    return new Date(this.t);
  }
  set(at: Date | number): void {
    this.t = typeof at === 'number' ? at : at.getTime();
  }
  advance(ms: number): void {
    this.t += ms;
  }
}

export const PUBLIC_URL = 'https://watch.wellkept.test';

export interface RulesApp {
  app: NestFastifyApplication;
  mqttUrl: string;
  clock: FakeClock;
  scheduler: RulesSchedulerService;
  evaluation: RulesEvaluationService;
  lifecycle: AlertLifecycleService;
  notifier: AlertNotifier;
  summaries: MorningSummaryService;
  sender: OutboxSenderService;
  sweep(): Promise<unknown>;
  close(): Promise<void>;
}

/**
 * The real ingest application (broker, telemetry path, storage) with the rules and
 * notifications modules, the mail pointed at a catcher, a fake clock and short timers.
 */
export async function startRulesApp(
  databaseUrl: string,
  catcher: Pick<MailCatcher, 'smtp'>,
  options: { clock?: FakeClock; rules?: Partial<RulesConfig>; mail?: Partial<MailConfig> } = {},
): Promise<RulesApp> {
  const config = testConfig(databaseUrl);
  const clock = options.clock ?? new FakeClock(Date.now());
  const mail: MailConfig = {
    smtp: catcher.smtp,
    publicUrl: PUBLIC_URL,
    sendIntervalSeconds: 0.2,
    maxAttempts: 100,
    retryDelay: () => 0.3,
    ...options.mail,
  };
  const rules: RulesConfig = {
    debounceMs: 30,
    minIntervalMs: 0,
    tickMs: 3_600_000,
    fullEveryMs: 3_600_000,
    reopenWithinSeconds: 12 * 3600,
    dawnGraceSeconds: 1800,
    concurrency: 2,
    ...options.rules,
  };
  const moduleRef = await Test.createTestingModule({
    imports: [
      AppModule.forRoot(config, createLogger(config.logLevel)),
      NotificationsModule,
      RulesModule,
    ],
  })
    .overrideProvider(CLOCK)
    .useValue(clock)
    .overrideProvider(MAIL_CONFIG)
    .useValue(mail)
    .overrideProvider(RULES_CONFIG)
    .useValue(rules)
    .compile();
  const app = moduleRef.createNestApplication<NestFastifyApplication>(new FastifyAdapter(), {
    logger: false,
  });
  await app.listen(0, '127.0.0.1');
  const broker = app.get(BrokerService);
  return {
    app,
    mqttUrl: `mqtt://127.0.0.1:${broker.ports.mqtt}`,
    clock,
    scheduler: app.get(RulesSchedulerService),
    evaluation: app.get(RulesEvaluationService),
    lifecycle: app.get(AlertLifecycleService),
    notifier: app.get(AlertNotifier),
    summaries: app.get(MorningSummaryService),
    sender: app.get(OutboxSenderService),
    sweep: () => app.get(RollupService).sweep(),
    close: () => app.close(),
  };
}

let counter = 0;
function tag(): string {
  counter += 1;
  return `${process.pid}-${counter}-${Math.random().toString(36).slice(2, 6)}`;
}

export interface Company {
  id: string;
  name: string;
}

export async function createCompany(
  db: Database,
  name = `Test installer ${tag()}`,
): Promise<Company> {
  const row = await db
    .insertInto('companies')
    .values({ name })
    .returning('id')
    .executeTakeFirstOrThrow();
  return { id: row.id, name };
}

export interface Person {
  id: string;
  email: string;
  name: string;
}

export async function createPerson(
  db: Database,
  companyId: string,
  role: 'admin' | 'technician' | 'owner',
  options: {
    name?: string;
    unitSystem?: 'us' | 'metric';
    timeZone?: string;
    quietHours?: [string, string];
    sites?: string[];
    active?: boolean;
  } = {},
): Promise<Person> {
  const t = tag();
  const email = `${role}-${t}@people.wellkept.test`;
  const name = options.name ?? `${role[0]!.toUpperCase()}${role.slice(1)} ${t}`;
  const row = await db
    .insertInto('users')
    .values({
      company_id: companyId,
      email,
      name,
      role,
      unit_system: options.unitSystem ?? 'us',
      time_zone: options.timeZone ?? 'UTC',
      quiet_hours_start: options.quietHours?.[0] ?? null,
      quiet_hours_end: options.quietHours?.[1] ?? null,
      active: options.active ?? true,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  for (const siteId of options.sites ?? []) {
    await db.insertInto('owner_sites').values({ user_id: row.id, site_id: siteId }).execute();
  }
  return { id: row.id, email, name };
}

export interface TestSite {
  id: string;
  name: string;
  gatewayId: string;
  secret: string;
}

/**
 * A site shaped like a small homestead: 24 V AGM bank and a 1.6 kW charging array, a
 * battery-run well pump (8 A) filling a 2 m × 2 m upright tank under a pump-up float.
 */
export async function createSite(
  db: Database,
  companyId: string,
  options: { name?: string; timeZone?: string; latitude?: number; longitude?: number } = {},
): Promise<TestSite> {
  const t = tag();
  const name = options.name ?? `Test homestead ${t}`;
  const site = await db
    .insertInto('sites')
    .values({
      company_id: companyId,
      name,
      latitude: options.latitude ?? 35.4,
      longitude: options.longitude ?? -107.9,
      elevation_m: 2000,
      time_zone: options.timeZone ?? 'America/Denver',
      reporting_interval_s: 60,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  await db
    .insertInto('battery_banks')
    .values({ site_id: site.id, chemistry: 'agm', nominal_voltage_v: 24, capacity_ah: 400 })
    .execute();
  await db
    .insertInto('pv_arrays')
    .values({
      site_id: site.id,
      key: 'house',
      name: 'House array',
      rated_w: 1600,
      purpose: 'battery_charging',
      tilt_deg: 30,
      azimuth_deg: 180,
    })
    .execute();
  const tank = await db
    .insertInto('tanks')
    .values({
      site_id: site.id,
      key: 'main',
      name: 'Main tank',
      kind: 'storage',
      geometry: 'vertical_cylinder',
      diameter_m: 2,
      height_m: 2,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  const pump = await db
    .insertInto('pumps')
    .values({
      site_id: site.id,
      key: 'well',
      name: 'Well pump',
      kind: 'well',
      supply: 'battery',
      rated_current_a: 8,
      rated_flow_m3s: 0.0004,
      motor_power_w: 370,
      fills_tank_id: tank.id,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  await db
    .insertInto('float_switches')
    .values({
      site_id: site.id,
      key: 'main-float',
      name: 'Main tank float',
      tank_id: tank.id,
      pump_id: pump.id,
      logic: 'closes_on_low',
    })
    .execute();
  const secret = newGatewaySecret();
  const gatewayId = `gw-${t}`.toLowerCase().replace(/[^a-z0-9-]/g, '-');
  await db
    .insertInto('gateways')
    .values({ id: gatewayId, site_id: site.id, secret_hash: hashGatewaySecret(secret) })
    .execute();
  return { id: site.id, name, gatewayId, secret };
}
