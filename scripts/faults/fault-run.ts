import { sql } from 'kysely';
import {
  bucketCheck,
  mailFigures,
  pumpRunCheck,
  telemetryFigures,
  type DerivedCheck,
  type MailFigures,
  type TelemetryFigures,
} from './checks.js';
import { HeartbeatGateways } from './heartbeat-gateways.js';
import { seedFleet } from './seed.js';
import { sleep } from './service-process.js';
import { SseClient, signIn } from './sse-clients.js';
import { startStack, type FaultStack } from './stack.js';
import { TelemetryGateways } from './telemetry-gateways.js';

export const FAULTS = ['postgres', 'ingest', 'smtp', 'api'] as const;
export type FaultName = (typeof FAULTS)[number];

export const FAULT_TITLES: Record<FaultName, string> = {
  postgres: 'PostgreSQL stopped (immediate) and restarted',
  ingest: 'ingest killed (SIGKILL) and restarted',
  smtp: 'SMTP server stopped and restarted',
  api: 'API restarted under live connections',
};

export interface FaultRunOptions {
  faults: readonly FaultName[];
  /** Telemetry gateways publishing numbered packs. */
  gateways: number;
  /** Packs per second per telemetry gateway while publishing. */
  packsPerSecond: number;
  /** Sites whose gateways report every second (alert mail on demand). */
  mailSites: number;
  /** Dashboards holding an event stream open. */
  sseClients: number;
  /** Publishing before the fault, ms. */
  beforeMs: number;
  /** How long the fault lasts, ms. */
  holdMs: number;
  /** Publishing after the fault is removed, ms. */
  afterMs: number;
  /** Longest wait for acknowledgements, roll-ups, mail and streams to settle, ms. */
  settleMs: number;
  /** Data-folder prefix of the database cluster. */
  prefix: string;
  log: (message: string) => void;
}

export interface FaultRow {
  fault: FaultName;
  telemetry: TelemetryFigures;
  /** From the fault's removal to the service working again, ms (see `recoveredBy`). */
  recoveryMs: number | null;
  /** What "working again" means for this fault. */
  recoveredBy: string;
  buckets: DerivedCheck;
  pumpRuns: DerivedCheck;
  mail: MailFigures;
  /** Mail rows that were due and failing while the fault lasted (the SMTP fault). */
  mailDueDuringFault: number;
  sse: { clients: number; resumed: number };
  /** Everything that broke a guarantee; empty when the row is clean. */
  problems: string[];
}

/** Polls `check` until `done(value)` or the time is up; returns the last value. */
async function settle<T>(check: () => Promise<T>, done: (v: T) => boolean, ms: number): Promise<T> {
  const until = Date.now() + ms;
  for (;;) {
    let value: T | undefined;
    try {
      value = await check();
      if (done(value) || Date.now() > until) return value;
    } catch (error) {
      // the database may be on its way back
      if (Date.now() > until) throw error;
    }
    await sleep(250);
  }
}

/**
 * Runs the faults in turn against one stack (real PostgreSQL, ingest, API and SMTP catcher) and
 * returns one row of figures per fault. Publishing pauses between faults so every check sees a
 * settled database: all packs of the fault acknowledged, roll-up and pump runs caught up, mail
 * sent.
 */
export async function runFaults(options: FaultRunOptions): Promise<FaultRow[]> {
  const log = options.log;
  log('starting PostgreSQL, mail catcher, ingest and API...');
  const stack = await startStack({ prefix: options.prefix, log });
  let telemetry: TelemetryGateways | undefined;
  let heartbeats: HeartbeatGateways | undefined;
  const sse: SseClient[] = [];
  try {
    const data = await seedFleet(stack.db, {
      tag: 'data',
      count: options.gateways,
      withEquipment: true,
      mailOnAlerts: false,
    });
    const mail = await seedFleet(stack.db, {
      tag: 'mail',
      count: options.mailSites,
      reportingIntervalS: 1,
    });
    const dataSites = data.gateways.map((g) => g.siteId);
    const mailSites = mail.gateways.map((g) => g.siteId);
    // Samples a day back, 10 s apart: each pack's time is its sequence number.
    const t0 = Math.floor(Date.now() / 60_000) * 60 - 24 * 3600;
    telemetry = new TelemetryGateways(data.gateways, {
      mqttUrl: stack.mqttUrl,
      t0,
      packsPerSecond: options.packsPerSecond,
      maxInflight: 200,
      republishEvery: 25,
    });
    heartbeats = new HeartbeatGateways(mail.gateways, stack.mqttUrl);
    await telemetry.connected();
    heartbeats.start();
    const cookie = await signIn(stack.apiUrl, data.admin.email, data.admin.password);
    for (let i = 0; i < options.sseClients; i++) {
      const client = new SseClient(`${stack.apiUrl}/api/events`, cookie);
      client.start();
      sse.push(client);
    }
    await settle(
      async () => sse.every((c) => c.opened.length > 0),
      (ok) => ok,
      options.settleMs,
    );

    const rows: FaultRow[] = [];
    for (const fault of options.faults) {
      log(`fault: ${FAULT_TITLES[fault]}`);
      rows.push(
        await runOne(fault, stack, telemetry, heartbeats, sse, {
          ...options,
          t0,
          dataSites,
          mailSiteIds: mailSites,
        }),
      );
    }
    return rows;
  } finally {
    await Promise.all(sse.map((c) => c.stop()));
    await telemetry?.close();
    await heartbeats?.close();
    const crashes = [...stack.ingest.crashes, ...stack.api.crashes];
    if (crashes.length) log(`unexpected exits: ${crashes.join('; ')}`);
    await stack.stop();
  }
}

async function runOne(
  fault: FaultName,
  stack: FaultStack,
  telemetry: TelemetryGateways,
  heartbeats: HeartbeatGateways,
  sse: SseClient[],
  o: FaultRunOptions & { t0: number; dataSites: string[]; mailSiteIds: string[] },
): Promise<FaultRow> {
  const problems: string[] = [];
  const crashesBefore = stack.ingest.crashes.length + stack.api.crashes.length;
  const from = new Map(telemetry.logs.map((l) => [l.gateway.gatewayId, l.next]));
  const resentBefore = new Map(
    telemetry.logs.map((l) => [l.gateway.gatewayId, TelemetryGateways.duplicateSends(l)]),
  );
  telemetry.startPublishing();
  await sleep(o.beforeMs);

  let removedAt = 0;
  let recoveryMs: number | null = null;
  let recoveredBy = 'first PUBACK after the fault';
  let mailDueDuringFault = 0;
  const firstAck = async () => {
    const at = await settle(
      async () => telemetry.firstAckSince(removedAt),
      (v) => v !== null,
      o.settleMs,
    );
    return at === null ? null : at - removedAt;
  };

  if (fault === 'postgres') {
    stack.cluster.stop('immediate');
    await sleep(o.holdMs);
    stack.cluster.start();
    removedAt = Date.now();
    recoveryMs = await firstAck();
    o.log(`  PostgreSQL back; first PUBACK ${recoveryMs} ms later`);
  } else if (fault === 'ingest') {
    await stack.ingest.kill();
    await sleep(o.holdMs);
    removedAt = Date.now();
    await stack.ingest.start();
    o.log(`  ingest ready ${Date.now() - removedAt} ms after the restart began`);
    recoveryMs = await firstAck();
  } else if (fault === 'smtp') {
    recoveredBy = 'every mail that was due delivered';
    // Start from healthy sites (an earlier fault may have silenced them for a while), so that
    // pausing them opens a fresh alert at every one.
    await settle(
      () => openAlerts(stack, o.mailSiteIds),
      (n) => n === 0,
      o.settleMs,
    );
    await stack.catcher.halt();
    // Silence the one-second sites: the rules open "gateway silent" and mail becomes due.
    heartbeats.stop();
    const due = await settle(
      () => failingMail(stack, o.mailSiteIds),
      (n) => n >= o.mailSites,
      o.settleMs + 20_000,
    );
    mailDueDuringFault = due;
    if (due < o.mailSites) problems.push(`only ${due} of ${o.mailSites} alert mails became due`);
    await sleep(o.holdMs);
    removedAt = Date.now();
    await stack.catcher.resume();
    const sent = await settle(
      () => unsentMail(stack, o.mailSiteIds),
      (n) => n === 0,
      o.settleMs,
    );
    recoveryMs = sent === 0 ? Date.now() - removedAt : null;
    heartbeats.start(); // the sites report again: the alerts clear and the clear mail goes out
  } else {
    recoveredBy = 'every live stream received a new event';
    const { forced } = await stack.api.stop(10_000);
    if (forced) problems.push('the API did not stop on SIGTERM within 10 s (killed)');
    await sleep(o.holdMs);
    removedAt = Date.now();
    await stack.api.start();
    o.log(`  API ready ${Date.now() - removedAt} ms after the restart began`);
    await settle(
      async () => sse.every((c) => c.firstEventSince(removedAt) !== null),
      (ok) => ok,
      o.settleMs,
    );
    const firsts = sse.map((c) => c.firstEventSince(removedAt));
    recoveryMs = firsts.every((t) => t !== null)
      ? Math.max(...firsts.map((t) => t! - removedAt))
      : null;
  }

  await sleep(o.afterMs);
  o.log('  publishing after the fault');
  // Live streams: every dashboard hears of something after the fault was removed (while data
  // still flows: an event stream only carries news).
  await settle(
    async () => sse.every((c) => c.firstEventSince(removedAt) !== null),
    (ok) => ok,
    o.settleMs,
  );
  telemetry.stopPublishing();
  o.log('  publishing paused; checking');
  const range = new Map(
    telemetry.logs.map((l) => [
      l.gateway.gatewayId,
      { from: from.get(l.gateway.gatewayId)!, to: l.next },
    ]),
  );
  if (!(await telemetry.drained(o.settleMs + 30_000))) {
    problems.push(`${telemetry.unacknowledged()} packs still unacknowledged`);
  }
  o.log('  acknowledgements drained');
  const figures = await telemetryFigures(stack.db, telemetry.logs, o.t0, range, resentBefore);
  if (figures.missing > 0)
    problems.push(
      `${figures.missing} acknowledged packs missing (${figures.missingExamples.join(', ')})`,
    );
  if (figures.duplicateRows > 0) problems.push(`${figures.duplicateRows} records stored twice`);

  const sites = [...o.dataSites, ...o.mailSiteIds];
  const buckets = await settle(
    () => bucketCheck(stack.db, sites),
    (c) => c.mismatched === 0,
    o.settleMs,
  );
  if (buckets.mismatched > 0)
    problems.push(
      `${buckets.mismatched} buckets differ from raw rows (${buckets.examples.join('; ')})`,
    );
  const pumpRuns = await settle(
    () => pumpRunCheck(stack.db, o.dataSites),
    (c) => c.mismatched === 0,
    o.settleMs,
  );
  o.log('  buckets and pump runs compared');
  if (pumpRuns.mismatched > 0)
    problems.push(`${pumpRuns.mismatched} pump runs differ (${pumpRuns.examples.join('; ')})`);

  // Mail: wait for the alert events to be mailed and the mail to be sent, then count copies.
  const mail = await settle(
    async () => mailFigures(stack.db, o.mailSiteIds, await stack.catcher.all()),
    (m) => m.eventsPending === 0 && m.unsent === 0 && m.delivered === m.outbox,
    o.settleMs,
  );
  if (mail.duplicated > 0) problems.push(`${mail.duplicated} alert mails delivered twice`);
  if (mail.lost > 0) problems.push(`${mail.lost} alert mails marked sent but never delivered`);
  if (mail.unsent > 0 || mail.eventsPending > 0)
    problems.push(`${mail.unsent} mails unsent, ${mail.eventsPending} alert events not mailed`);
  if (fault === 'smtp' && mail.outbox < 2 * o.mailSites)
    problems.push(`expected open and clear mail for ${o.mailSites} sites, got ${mail.outbox}`);

  const resumed = sse.filter((c) => c.firstEventSince(removedAt) !== null).length;
  if (resumed < sse.length) problems.push(`${sse.length - resumed} live streams did not resume`);

  const crashes = [...stack.ingest.crashes, ...stack.api.crashes].slice(crashesBefore);
  for (const c of crashes) problems.push(`unexpected exit: ${c}`);
  if (recoveryMs === null) problems.push('did not recover');

  return {
    fault,
    telemetry: figures,
    recoveryMs,
    recoveredBy,
    buckets,
    pumpRuns,
    mail,
    mailDueDuringFault,
    sse: { clients: sse.length, resumed },
    problems,
  };
}

/** Alerts not cleared at the sites. */
async function openAlerts(stack: FaultStack, siteIds: string[]): Promise<number> {
  const { rows } = await sql<{ n: number }>`
    select count(*)::int as n from alerts
    where site_id = any(${siteIds}::uuid[]) and status <> 'cleared'`.execute(stack.db);
  return rows[0]!.n;
}

/** Alert mail of the sites that is due, not sent and has failed at least once. */
async function failingMail(stack: FaultStack, siteIds: string[]): Promise<number> {
  const { rows } = await sql<{ n: number }>`
    select count(*)::int as n from email_outbox o join alert_events e on e.id = o.alert_event_id
    where e.site_id = any(${siteIds}::uuid[]) and o.sent_at is null and o.attempts > 0`.execute(
    stack.db,
  );
  return rows[0]!.n;
}

async function unsentMail(stack: FaultStack, siteIds: string[]): Promise<number> {
  const { rows } = await sql<{ n: number }>`
    select count(*)::int as n from email_outbox o join alert_events e on e.id = o.alert_event_id
    where e.site_id = any(${siteIds}::uuid[]) and o.sent_at is null`.execute(stack.db);
  return rows[0]!.n;
}
