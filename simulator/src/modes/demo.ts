/**
 * `simulate demo` (what `npm start` runs): the demo sites through the real broker. On the first
 * run it backfills 30 days of history (with the demo's faults already under way), then runs in
 * real time. A state file in the data folder remembers when the demo's clock began and how far
 * each gateway's readings were acknowledged; after a restart each site's physics is replayed
 * silently to that point (the simulation is a pure function of seed and time), the gap is
 * backfilled, and real time resumes. A fresh seed (new gateway secrets) starts a fresh history.
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { dataRoot } from '@wellkept/db';
import { demoSites } from '../demo/scenario.js';
import { type DemoGatewayCredentials, demoGatewaysFile, readDemoGateways } from '../demo/seed.js';
import type { ScheduledFault } from '../faults/fault-kinds.js';
import { demoFaults } from '../faults/fault-schedule.js';
import { Fleet } from './fleet.js';
import { formatStats } from './status-line.js';

/** How much history the demo shows: 30 days, less a margin so none of it is refused as too old. */
export const DEMO_HISTORY_SECONDS = 30 * 86_400 - 1800;

interface DemoState {
  version: 1;
  /** When the demo's clock began (its faults are placed relative to this), epoch seconds. */
  anchorT: number;
  /** Fingerprint of the gateway secrets: a re-seeded database means a fresh history. */
  gateways: string;
  /** Per gateway: readings acknowledged up to this simulated time. */
  ackedThroughT: Record<string, number>;
}

export function demoStateFile(): string {
  return join(dataRoot(), 'simulator-demo.json');
}

function fingerprint(credentials: readonly DemoGatewayCredentials[]): string {
  const text = credentials
    .map((c) => `${c.gatewayId}:${c.secret}`)
    .sort()
    .join('\n');
  return createHash('sha256').update(text).digest('hex').slice(0, 16);
}

function readState(file: string): DemoState | null {
  if (!existsSync(file)) return null;
  try {
    const state = JSON.parse(readFileSync(file, 'utf8')) as DemoState;
    return state.version === 1 && Number.isFinite(state.anchorT) ? state : null;
  } catch {
    return null;
  }
}

function writeState(file: string, state: DemoState): void {
  mkdirSync(dirname(file), { recursive: true });
  const temporary = `${file}.tmp`;
  writeFileSync(temporary, JSON.stringify(state, null, 2));
  renameSync(temporary, file);
}

export interface DemoOptions {
  url: string;
  gatewaysFile?: string;
  stateFile?: string;
  /** Faults added from the command line. */
  extraFaults?: readonly ScheduledFault[];
  reportSeconds?: number;
  /** Interval of the backfilled history, seconds. Default 60. */
  historySeconds?: number;
  /** How much history a fresh demo gets, seconds. Default {@link DEMO_HISTORY_SECONDS}. */
  historySpanSeconds?: number;
  log: (line: string) => void;
  /** Resolves when the demo should stop (e.g. on SIGTERM). */
  stopSignal: Promise<void>;
}

export async function runDemo(options: DemoOptions): Promise<void> {
  const log = options.log;
  const gatewaysFile = options.gatewaysFile ?? demoGatewaysFile();
  let credentials = readDemoGateways(gatewaysFile);
  while (credentials.length === 0) {
    log(
      `waiting for the demo gateways' secrets in ${gatewaysFile} (written when the demo is seeded)`,
    );
    const stop = await Promise.race([
      options.stopSignal.then(() => true),
      new Promise<boolean>((r) => setTimeout(() => r(false), 5000)),
    ]);
    if (stop) return;
    credentials = readDemoGateways(gatewaysFile);
  }
  const stateFile = options.stateFile ?? demoStateFile();
  const nowT = Date.now() / 1000;
  const print = fingerprint(credentials);
  let state = readState(stateFile);
  const fresh = !state || state.gateways !== print;
  if (!state || fresh) {
    state = { version: 1, anchorT: Math.floor(nowT), gateways: print, ackedThroughT: {} };
    writeState(stateFile, state);
  }
  const anchorT = state.anchorT;
  const historyStartT = anchorT - (options.historySpanSeconds ?? DEMO_HISTORY_SECONDS);
  const faults = [...demoFaults(demoSites, anchorT), ...(options.extraFaults ?? [])];
  const secrets = new Map(credentials.map((c) => [c.gatewayId, c]));
  const sites = demoSites
    .filter((s) => secrets.has(s.gatewayId))
    .map((site) => ({ site, credentials: secrets.get(site.gatewayId)! }));

  // History goes at its own (coarser) interval; real time at the reporting interval. Two
  // fleets over the same deterministic physics would disagree on sensor noise, so one fleet
  // changes interval between the phases.
  const historySeconds = options.historySeconds ?? 60;
  const fleet = new Fleet({
    url: options.url,
    sites,
    faults,
    startT: historyStartT,
    reportSeconds: historySeconds,
    log,
  });
  // Nothing older than ingest's 30-day limit can be sent; replay silently up to where each
  // gateway's readings were already acknowledged.
  const oldestSendable = nowT - DEMO_HISTORY_SECONDS;
  for (const m of fleet.members) {
    const acked = state.ackedThroughT[m.link.gatewayId] ?? 0;
    fleet.skipTo(m, Math.max(acked, oldestSendable, historyStartT));
  }
  const save = () => {
    for (const m of fleet.members) {
      if (m.link.ackedThroughT > 0) state.ackedThroughT[m.link.gatewayId] = m.link.ackedThroughT;
    }
    writeState(stateFile, state);
  };

  fleet.connect();
  // (A gateway whose link is down replays its whole outage into its queue; not counted here.)
  const reporting = fleet.members.filter((m) => !m.sim.faultActive('gateway_offline', nowT));
  const oldest = Math.min(...(reporting.length ? reporting : fleet.members).map((m) => m.sim.t));
  const gapHours = (nowT - oldest) / 3600;
  log(
    fresh
      ? `first run: sending ${Math.round(gapHours / 24)} days of history for ${sites.length} demo sites (demo faults under way: ${faults.map((f) => `${f.siteKey} ${f.kind}`).join(', ')})`
      : `resuming: sending the last ${gapHours.toFixed(2)} h of history for ${sites.length} demo sites`,
  );
  let stopping = false;
  void options.stopSignal.then(async () => {
    stopping = true;
    save();
    await fleet.stop();
    save();
  });
  const started = Date.now();
  await fleet.backfill(Date.now() / 1000 - historySeconds, (t) => {
    save();
    log(`history: ${new Date(t * 1000).toISOString().slice(0, 16)}Z ${formatStats(fleet.stats())}`);
  });
  if (stopping) return;
  save();
  log(`history sent in ${((Date.now() - started) / 1000).toFixed(0)} s; now running in real time`);
  fleet.reportSeconds = options.reportSeconds ?? 30;
  let lastStatus = Date.now();
  await fleet.runLive({
    speed: 1,
    onTick: () => {
      if (Date.now() - lastStatus < 60_000) return;
      lastStatus = Date.now();
      save();
      log(formatStats(fleet.stats()));
    },
  });
}
