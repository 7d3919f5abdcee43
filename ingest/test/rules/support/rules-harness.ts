import 'reflect-metadata';
import { FastifyAdapter, type NestFastifyApplication } from '@nestjs/platform-fastify';
import { Test } from '@nestjs/testing';
import type { Database } from '@wellkept/db';
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
import { tag } from './homestead-site.js';

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

export { createCompany, createSite, type Company, type TestSite } from './homestead-site.js';

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
