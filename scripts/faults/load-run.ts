import { spawn } from 'node:child_process';
import { readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createInterface } from 'node:readline';
import { repoRoot } from '@wellkept/db';
import { sql } from 'kysely';
import { textTable } from './report-table.js';
import { seedFleet } from './seed.js';
import { sleep } from './service-process.js';
import { signIn } from './sse-clients.js';
import { startStack, type FaultStack } from './stack.js';

export interface LoadOptions {
  /** Gateway connections held for the whole run. */
  connections: number;
  minutes: number;
  /** Dashboard users requesting the fleet overview at once. */
  users: number;
  /** Pause between one user's requests, ms (0: back to back). */
  thinkMs: number;
  log: (m: string) => void;
}

export interface LoadResult {
  errors: number;
  missing: number;
}

/** Figures line printed by load-gateways.ts. */
interface GatewayFigures {
  final: boolean;
  connected: number;
  published: number;
  acked: number;
  publishErrors: number;
  connectionErrors: number;
  closes: number;
  inflight: number;
  ackMs: { p50: number | null; p95: number | null; p99: number | null; max: number | null };
  rssBytes: number;
}

const RECORDS_PER_PACK = 8;
const REPORTING_INTERVAL_S = 30;

function percentile(sorted: readonly number[], p: number): number {
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))] ?? NaN;
}

const mb = (bytes: number | null | undefined) =>
  bytes === null || bytes === undefined ? '-' : `${Math.round(bytes / 1048576)} MB`;

/** Resident memory of the PostgreSQL server: the postmaster and its children, bytes. */
function postgresRss(dataDir: string): number | null {
  try {
    const pid = Number(readFileSync(join(dataDir, 'postmaster.pid'), 'utf8').split('\n')[0]);
    let total = 0;
    const add = (p: number) => {
      const kb = /VmRSS:\s+(\d+)/.exec(readFileSync(`/proc/${p}/status`, 'utf8'))?.[1];
      total += Number(kb ?? 0) * 1024;
    };
    add(pid);
    const children = readFileSync(`/proc/${pid}/task/${pid}/children`, 'utf8').trim();
    for (const c of children ? children.split(/\s+/) : []) add(Number(c));
    return total;
  } catch {
    return null;
  }
}

/**
 * Load: `connections` gateways publish one pack each every 30 s for `minutes` while `users`
 * dashboard users load the fleet overview; prints ingest lag (PUBACK latency, which includes
 * the database commit), API latency, memory of every service and errors, then checks that every
 * acknowledged pack is in the database.
 */
export async function runLoad(o: LoadOptions): Promise<LoadResult> {
  const log = o.log;
  log(`load: ${o.connections} gateways for ${o.minutes} min, ${o.users} dashboard users`);
  const stack = await startStack({
    prefix: 'faults-load',
    log,
    // Production timings (the fault runs shorten them), room for the connections.
    ingestEnv: {
      INGEST_ROLLUP_INTERVAL_MS: '10000',
      INGEST_LAST_SEEN_INTERVAL_MS: '5000',
      RULES_TICK_MS: '60000',
      RULES_DEBOUNCE_MS: '5000',
      RULES_MIN_INTERVAL_MS: '120000',
      MAIL_SEND_INTERVAL_S: '15',
      MQTT_MAX_CONNECTIONS: String(Math.max(20_000, o.connections + 1000)),
    },
  });
  const gatewaysFile = join(tmpdir(), `wellkept-load-gateways-${process.pid}.json`);
  try {
    log('seeding sites and gateways...');
    const fleet = await seedFleet(stack.db, {
      tag: 'load',
      count: o.connections,
      withEquipment: true,
      mailOnAlerts: false,
    });
    writeFileSync(gatewaysFile, JSON.stringify(fleet.gateways));
    const cookies: string[] = [];
    for (let i = 0; i < o.users; i++) {
      cookies.push(await signIn(stack.apiUrl, fleet.admin.email, fleet.admin.password));
    }
    return await measure(
      stack,
      o,
      gatewaysFile,
      cookies,
      fleet.gateways.map((g) => g.siteId),
    );
  } finally {
    rmSync(gatewaysFile, { force: true });
    await stack.stop();
  }
}

async function measure(
  stack: FaultStack,
  o: LoadOptions,
  gatewaysFile: string,
  cookies: string[],
  siteIds: string[],
): Promise<LoadResult> {
  const log = o.log;
  const durationS = o.minutes * 60;
  const worker = spawn(
    process.execPath,
    [
      '--conditions=source',
      '--import',
      'tsx',
      join(repoRoot, 'scripts/faults/load-gateways.ts'),
      JSON.stringify({
        url: stack.mqttUrl,
        gatewaysFile,
        intervalS: REPORTING_INTERVAL_S,
        durationS: durationS + 3600, // stopped from here, after the measured window
      }),
    ],
    { cwd: repoRoot, stdio: ['pipe', 'pipe', 'inherit'] },
  );
  let latest: GatewayFigures | null = null;
  let connectedAll: { connectedAll: number; connectMs: number } | null = null;
  const finished = new Promise<GatewayFigures | null>((resolve) => {
    createInterface({ input: worker.stdout! }).on('line', (line) => {
      try {
        const parsed = JSON.parse(line) as GatewayFigures & {
          connectedAll?: number;
          connectMs?: number;
        };
        if (parsed.connectedAll !== undefined) {
          connectedAll = { connectedAll: parsed.connectedAll, connectMs: parsed.connectMs ?? 0 };
          return;
        }
        latest = parsed;
        if (parsed.final) resolve(parsed);
      } catch {
        // not a figures line
      }
    });
    worker.on('exit', () => resolve(latest));
  });

  log('connecting the gateways...');
  while (!connectedAll && worker.exitCode === null) await sleep(200);
  const connected = connectedAll as { connectedAll: number; connectMs: number } | null;
  log(`${connected?.connectedAll ?? 0} gateways connected in ${connected?.connectMs ?? '?'} ms`);

  // Dashboard users: each loads the first page of the fleet overview, pauses, loads it again.
  const apiMs: number[] = [];
  const apiErrors: string[] = [];
  let running = true;
  const users = cookies.map(async (cookie) => {
    await sleep(Math.random() * Math.max(o.thinkMs, 100));
    while (running) {
      const started = performance.now();
      try {
        const res = await fetch(`${stack.apiUrl}/api/fleet?limit=50`, {
          headers: { cookie },
          signal: AbortSignal.timeout(30_000),
        });
        await res.arrayBuffer();
        if (res.status === 200) apiMs.push(performance.now() - started);
        else apiErrors.push(`HTTP ${res.status}`);
      } catch (error) {
        apiErrors.push((error as Error).message);
      }
      if (o.thinkMs > 0) await sleep(o.thinkMs);
    }
  });

  const rss = { ingest: 0, api: 0, postgres: 0, gateways: 0 };
  const sample = () => {
    rss.ingest = Math.max(rss.ingest, stack.ingest.rssBytes() ?? 0);
    rss.api = Math.max(rss.api, stack.api.rssBytes() ?? 0);
    rss.postgres = Math.max(rss.postgres, postgresRss(stack.cluster.dataDir) ?? 0);
    rss.gateways = Math.max(rss.gateways, latest?.rssBytes ?? 0);
  };
  const runUntil = Date.now() + durationS * 1000;
  while (Date.now() < runUntil) {
    await sleep(Math.min(10_000, Math.max(0, runUntil - Date.now())));
    sample();
    const g = latest as GatewayFigures | null;
    const sorted = [...apiMs].sort((a, b) => a - b);
    log(
      `${Math.round((durationS * 1000 - (runUntil - Date.now())) / 1000)} s: packs acked ${g?.acked ?? 0}, ` +
        `PUBACK p95 ${g?.ackMs.p95?.toFixed(0) ?? '-'} ms, fleet requests ${apiMs.length} ` +
        `(p95 ${percentile(sorted, 95).toFixed(0)} ms), errors ${apiErrors.length + (g ? g.publishErrors + g.connectionErrors : 0)}`,
    );
  }
  running = false;
  worker.stdin!.write('stop\n');
  await Promise.all(users);
  const final = await finished;
  sample();

  // Every acknowledged pack must be in the database (8 records each).
  const { rows } = await sql<{ n: number }>`
    select count(*)::int as n from readings where site_id = any(${siteIds}::uuid[])`.execute(
    stack.db,
  );
  const stored = rows[0]!.n;
  const acked = final?.acked ?? 0;
  const missing = Math.max(0, acked * RECORDS_PER_PACK - stored);
  const sorted = [...apiMs].sort((a, b) => a - b);
  const gatewayErrors = final ? final.publishErrors + final.connectionErrors + final.closes : 1;
  const crashes = [...stack.ingest.crashes, ...stack.api.crashes];
  const errors = apiErrors.length + gatewayErrors + crashes.length;

  console.log('');
  console.log(
    textTable(
      ['figure', 'value'],
      [
        ['gateway connections', String(connected?.connectedAll ?? 0)],
        ['time to connect them all', `${connected?.connectMs ?? '-'} ms`],
        ['run', `${o.minutes} min, one pack per gateway every ${REPORTING_INTERVAL_S} s`],
        ['packs published / acknowledged', `${final?.published ?? 0} / ${acked}`],
        ['records acknowledged / in the database', `${acked * RECORDS_PER_PACK} / ${stored}`],
        ['missing records', String(missing)],
        [
          'ingest lag (PUBACK after commit) p50 / p95 / p99 / max',
          final
            ? [final.ackMs.p50, final.ackMs.p95, final.ackMs.p99, final.ackMs.max]
                .map((v) => (v === null ? '-' : `${v.toFixed(0)} ms`))
                .join(' / ')
            : '-',
        ],
        ['dashboard users', String(o.users)],
        ['fleet overview requests', String(apiMs.length + apiErrors.length)],
        [
          'API fleet overview p50 / p95 / p99',
          [50, 95, 99].map((p) => `${percentile(sorted, p).toFixed(0)} ms`).join(' / '),
        ],
        ['API errors', String(apiErrors.length)],
        [
          'gateway errors (publish / connection / closes)',
          final
            ? `${final.publishErrors} / ${final.connectionErrors} / ${final.closes}`
            : 'no figures',
        ],
        ['service exits', crashes.length ? crashes.join('; ') : '0'],
        ['peak RSS ingest', mb(rss.ingest)],
        ['peak RSS API', mb(rss.api)],
        ['peak RSS PostgreSQL (all processes)', mb(rss.postgres)],
        ['peak RSS gateway simulator', mb(rss.gateways)],
      ],
    ),
  );
  if (apiErrors.length) log(`first API errors: ${[...new Set(apiErrors)].slice(0, 3).join('; ')}`);
  return { errors, missing };
}
