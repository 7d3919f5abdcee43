/**
 * Two-node ingest benchmark (run by `npm run bench -w ingest` after the single-node one;
 * figures printed, nothing asserted).
 *
 * The same load (BENCH_CONNECTIONS gateways, default 1,000, publishing 8-record packs at QoS 1
 * at a saturating offered rate) against:
 *  (1) one ingest node in the default single mode, gateways connected straight to it;
 *  (2) one ingest node in shared mode (Redis) behind HAProxy: the cost of the balancer hop and
 *      of Redis, with no second node to help;
 *  (3) two ingest nodes in shared mode behind HAProxy (round-robin).
 * It prints committed packs/s and records/s, PUBACK latency, the ratio (3)/(1), acknowledged
 * records missing in (3), and where the CPU time went in each run: every process here (load
 * generator, HAProxy, Redis, ingest nodes, PostgreSQL) shares this machine's cores, so the
 * CPU split shows where the ceiling is.
 */
import { spawn } from 'node:child_process';
import { readFileSync, readdirSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { createPool, repoRoot, startThrowawayCluster, type DB } from '@wellkept/db';
import { Kysely, PostgresDialect } from 'kysely';
import { seedBenchGateways } from './seed-bench-gateways.js';
import {
  scratchFolder,
  startHaproxy,
  startIngestNode,
  startRedis,
  type IngestNode,
} from '../test/cluster/loopback-services.js';
import { copyText } from './copy-text.js';

const here = fileURLToPath(new URL('.', import.meta.url));
const CONNECTIONS = Number(process.env.BENCH_CONNECTIONS ?? 1000);
const SECONDS = Number(process.env.BENCH_SECONDS ?? 15);
const WARMUP = Number(process.env.BENCH_WARMUP_SECONDS ?? 3);
const OFFERED = Number(process.env.BENCH_OFFERED_PER_SECOND ?? 20_000);
/**
 * Unacknowledged packs per gateway. Fewer than the single-node benchmark's 20: with every
 * process on 2 shared cores, 20,000 packs in flight make PUBACKs take longer than a run.
 */
const MAX_INFLIGHT = Number(process.env.BENCH_MAX_INFLIGHT ?? 5);
const RECORDS_PER_PACK = 8;
const CLOCK_TICKS = 100; // USER_HZ on Linux: /proc/<pid>/stat counts CPU time in 1/100 s

interface GeneratorResult {
  connections: number;
  connectSeconds: number;
  sent: number;
  acked: number;
  errors: number;
  ackedPerSecond: number;
  latencyMs: { p50: number; p95: number; p99: number };
}

const log = (m: string) => console.log(`[bench two-nodes] ${m}`);
const scratch = scratchFolder('two-nodes-bench');
const gatewaysFile = join(scratch.dir, 'gateways.json');

/** CPU seconds (user + system) used so far by each process. */
function cpuSeconds(pid: number): number {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    return (Number(fields[11]) + Number(fields[12])) / CLOCK_TICKS;
  } catch {
    return 0; // gone
  }
}

/** The PostgreSQL server processes: the postmaster (first line of postmaster.pid) and its children. */
function postgresPids(dataDir: string): number[] {
  const postmaster = Number(readFileSync(join(dataDir, 'postmaster.pid'), 'utf8').split('\n')[0]);
  const pids = [postmaster];
  for (const name of readdirSync('/proc')) {
    if (!/^\d+$/.test(name)) continue;
    try {
      const stat = readFileSync(`/proc/${name}/stat`, 'utf8');
      const ppid = Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]);
      if (ppid === postmaster) pids.push(Number(name));
    } catch {
      // exited meanwhile
    }
  }
  return pids;
}

/** Busy and total CPU time of the whole machine so far (first line of /proc/stat). */
function machineCpu(): { busy: number; total: number } {
  const fields = readFileSync('/proc/stat', 'utf8').split('\n')[0]!.trim().split(/\s+/).slice(1);
  const values = fields.map(Number);
  const total = values.reduce((a, b) => a + b, 0);
  const idle = values[3]! + (values[4] ?? 0); // idle + iowait
  return { busy: (total - idle) / CLOCK_TICKS, total: total / CLOCK_TICKS };
}

async function runGenerator(url: string, ackedFile: string): Promise<GeneratorResult> {
  const child = spawn(
    process.execPath,
    [
      '--import',
      'tsx',
      join(here, 'load-generator.ts'),
      JSON.stringify({
        url,
        gatewaysFile,
        offeredPerSecond: OFFERED,
        durationS: SECONDS,
        warmupS: WARMUP,
        ackedFile,
        maxInflight: MAX_INFLIGHT,
      }),
    ],
    { cwd: repoRoot, stdio: ['ignore', 'pipe', 'inherit'] },
  );
  let out = '';
  child.stdout!.on('data', (d: Buffer) => (out += d.toString()));
  const code = await new Promise<number | null>((r) => child.on('exit', r));
  const line = out.trim().split('\n').pop() ?? '';
  if (code !== 0 || !line.startsWith('{')) {
    throw new Error(`load generator failed (${code}): ${out}`);
  }
  return JSON.parse(line) as GeneratorResult;
}

/** Packs the nodes have committed so far (their wellkept_ingest_packs_total counters). */
async function committedPacks(httpPorts: number[]): Promise<number> {
  let total = 0;
  for (const port of httpPorts) {
    const text = await (await fetch(`http://127.0.0.1:${port}/metrics`)).text();
    const m = /^wellkept_ingest_packs_total\{outcome="committed"\} (\d+)/m.exec(text);
    total += Number(m?.[1] ?? 0);
  }
  return total;
}

/**
 * Committed packs/s over the measured part of a run, from the nodes' counters sampled every
 * 500 ms: from WARMUP to SECONDS after the first commit. (Counted where the database commits,
 * not from the acknowledgements of packs sent in a window: at saturation, packs sent late in
 * the window are acknowledged after it.)
 */
function committedRate(samples: { at: number; packs: number }[]): number {
  const first = samples.find((x) => x.packs > samples[0]!.packs);
  if (!first) return 0;
  const near = (t: number) =>
    samples.reduce((best, x) => (Math.abs(x.at - t) < Math.abs(best.at - t) ? x : best));
  const from = near(first.at + WARMUP * 1000);
  const to = near(first.at + SECONDS * 1000);
  return to.at > from.at ? ((to.packs - from.packs) * 1000) / (to.at - from.at) : 0;
}

interface RunResult {
  label: string;
  load: GeneratorResult;
  /** Packs per second the nodes committed over the measured part of the run. */
  committedPerSecond: number;
  /** Ingest CPU milliseconds per committed pack over the whole run (all nodes together). */
  ingestCpuMsPerPack: number;
  /** Cores each part kept busy, on average over the measured run. */
  cpu: Record<string, number>;
  /** Cores busy on the whole machine, on average over the run. */
  machineBusy: number;
}

/**
 * Runs the load against `url` and measures the CPU time of the named processes over the run
 * (PostgreSQL's backends are listed again at the end: connections open during the run).
 */
async function measure(
  label: string,
  url: string,
  nodes: IngestNode[],
  parts: Record<string, () => number[]>,
  ackedFile: string,
): Promise<RunResult> {
  log(`${label}: ${CONNECTIONS} gateways offering ${OFFERED} packs/s for ${SECONDS} s`);
  const startCpu = new Map<number, number>();
  const snapshot = (pids: number[]) => pids.forEach((p) => startCpu.set(p, cpuSeconds(p)));
  for (const pids of Object.values(parts)) snapshot(pids());
  const machineStart = machineCpu();
  const wallStart = performance.now();
  const ports = nodes.map((n) => n.httpPort);
  const samples = [{ at: performance.now(), packs: await committedPacks(ports) }];
  const sampler = setInterval(() => {
    const at = performance.now();
    committedPacks(ports).then(
      (packs) => samples.push({ at, packs }),
      () => undefined,
    );
  }, 500);
  const load = await runGenerator(url, ackedFile).finally(() => clearInterval(sampler));
  if (process.env.BENCH_DEBUG)
    console.log(samples.map((x) => `${Math.round(x.at)}:${x.packs}`).join(' '));
  const wall = (performance.now() - wallStart) / 1000;
  const machineEnd = machineCpu();
  const cpu: Record<string, number> = {};
  for (const [name, pids] of Object.entries(parts)) {
    cpu[name] = pids().reduce((s, p) => s + cpuSeconds(p) - (startCpu.get(p) ?? 0), 0) / wall;
  }
  return {
    label,
    load,
    committedPerSecond: committedRate(samples.sort((a, b) => a.at - b.at)),
    ingestCpuMsPerPack:
      (1000 * (cpu.ingest ?? 0) * wall) /
      Math.max(1, (await committedPacks(ports)) - samples[0]!.packs),
    cpu,
    machineBusy: (machineEnd.busy - machineStart.busy) / wall,
  };
}

// ---------------------------------------------------------------------------------------------
const pg = await startThrowawayCluster({ prefix: 'bench', database: 'bench', durable: true, log });
const running: { stop(): Promise<void> }[] = [];
process.on('SIGINT', () => {
  pg.destroy();
  scratch.remove();
  process.exit(130);
});

try {
  const pool = createPool(pg.databaseUrl, { max: 2, applicationName: 'wellkept-bench' });
  const db = new Kysely<DB>({ dialect: new PostgresDialect({ pool }) });
  log(`seeding ${CONNECTIONS} sites and gateways`);
  const gateways = await seedBenchGateways(db, CONNECTIONS, gatewaysFile);

  const redis = await startRedis(scratch.dir);
  running.push(redis);
  const nodeEnv = { MQTT_MAX_CONNECTIONS: String(CONNECTIONS + 100) };
  const pgPids = () => postgresPids(pg.cluster.dataDir);
  const results: RunResult[] = [];

  // (1) One node, single mode, no balancer.
  {
    const node = await startIngestNode({
      name: 'single',
      databaseUrl: pg.databaseUrl,
      env: nodeEnv,
    });
    const file = join(scratch.dir, 'acked-1.csv');
    results.push(
      await measure(
        '(1) one node, single mode',
        `mqtt://127.0.0.1:${node.port}`,
        [node],
        { ingest: () => [node.child.pid!], postgres: pgPids },
        file,
      ),
    );
    await node.stop();
  }

  // (2) One node, shared mode, behind HAProxy.
  {
    const node = await startIngestNode({
      name: 'a',
      databaseUrl: pg.databaseUrl,
      redisUrl: redis.url,
      env: nodeEnv,
    });
    const balancer = await startHaproxy(scratch.dir, [{ name: 'a', port: node.port }], CONNECTIONS);
    results.push(
      await measure(
        '(2) one node, shared mode, behind HAProxy',
        `mqtt://127.0.0.1:${balancer.port}`,
        [node],
        {
          ingest: () => [node.child.pid!],
          postgres: pgPids,
          haproxy: () => [balancer.child.pid!],
          redis: () => [redis.child.pid!],
        },
        join(scratch.dir, 'acked-2.csv'),
      ),
    );
    await balancer.stop();
    await node.stop();
  }

  // (3) Two nodes, shared mode, behind HAProxy.
  let missing = { packs: 0, missing_records: 0 };
  {
    const nodes: IngestNode[] = await Promise.all(
      ['a', 'b'].map((name) =>
        startIngestNode({ name, databaseUrl: pg.databaseUrl, redisUrl: redis.url, env: nodeEnv }),
      ),
    );
    const balancer = await startHaproxy(
      scratch.dir,
      nodes.map((n) => ({ name: n.name, port: n.port })),
      CONNECTIONS,
    );
    const ackedFile = join(scratch.dir, 'acked-3.csv');
    results.push(
      await measure(
        '(3) two nodes, shared mode, behind HAProxy',
        `mqtt://127.0.0.1:${balancer.port}`,
        nodes,
        {
          ingest: () => nodes.map((n) => n.child.pid!),
          postgres: pgPids,
          haproxy: () => [balancer.child.pid!],
          redis: () => [redis.child.pid!],
        },
        ackedFile,
      ),
    );
    // Every acknowledged pack must have all its records stored.
    const client = await pool.connect();
    try {
      await client.query('create temp table acked (gw int, t float8)');
      await copyText(
        client,
        'copy acked from stdin with (format csv)',
        readFileSync(ackedFile, 'utf8'),
      );
      const { rows } = await client.query<{ packs: number; missing_records: number }>(
        `select count(*)::int as packs,
                coalesce(sum(${RECORDS_PER_PACK} - (select count(*) from readings r
                   where r.site_id = ($1::uuid[])[a.gw + 1] and r.time = to_timestamp(a.t))), 0)::int
                  as missing_records
         from acked a`,
        [gateways.map((g) => g.site_id)],
      );
      missing = rows[0]!;
    } finally {
      client.release();
    }
    await balancer.stop();
    await Promise.all(nodes.map((n) => n.stop()));
  }
  await db.destroy();

  // (A percentile of no samples arrives as null: JSON has no NaN.)
  const f = (n: number | null, digits = 0) =>
    n === null || !Number.isFinite(n)
      ? 'n/a'
      : n.toLocaleString('en-US', { maximumFractionDigits: digits });
  const [one, oneShared, two] = results as [RunResult, RunResult, RunResult];
  const line = (r: RunResult) => {
    const cpu = Object.entries(r.cpu)
      .map(([name, cores]) => `${name} ${f(cores, 2)}`)
      .join(', ');
    const rest = r.machineBusy - Object.values(r.cpu).reduce((a, b) => a + b, 0);
    return `  ${r.label}
        committed:                     ${f(r.committedPerSecond)} packs/s = ${f(r.committedPerSecond * RECORDS_PER_PACK)} records/s (offered ${f(OFFERED)}; ${f(r.load.acked)} packs acknowledged in all)
        ingest CPU per pack:           ${f(r.ingestCpuMsPerPack, 3)} ms (all nodes, whole run)
        PUBACK latency p50/p95/p99:    ${f(r.load.latencyMs.p50, 1)} / ${f(r.load.latencyMs.p95, 1)} / ${f(r.load.latencyMs.p99, 1)} ms
        cores busy:                    ${f(r.machineBusy, 2)} of ${availableParallelism()} (${cpu}, load generator and the rest ${f(rest, 2)})`;
  };
  console.log(`
Two-node ingest benchmark — ${CONNECTIONS} gateways, 8-record packs, QoS 1, ${SECONDS} s runs (${WARMUP} s warm-up), ${availableParallelism()} cores
${line(one)}
${line(oneShared)}
${line(two)}
  two nodes vs one node (3)/(1):       ${f(two.committedPerSecond / one.committedPerSecond, 2)}×
  two nodes vs one shared node (3)/(2): ${f(two.committedPerSecond / oneShared.committedPerSecond, 2)}×
  acknowledged packs (3):              ${f(missing.packs)}; records missing: ${missing.missing_records}  (target 0)
  publish errors (1)/(2)/(3):          ${one.load.errors}/${oneShared.load.errors}/${two.load.errors}

  On this machine every process shares ${availableParallelism()} cores: the load generator, HAProxy, Redis,
  the ingest nodes and PostgreSQL. A second node adds an event loop but no core, so the gain is
  bounded by whatever CPU the first node left idle; see the cores-busy lines for where it went.
  On separate hosts each node brings its own cores, and one PostgreSQL becomes the ceiling
  (docs/running-at-scale.md).
`);
} finally {
  for (const r of running.reverse()) await r.stop();
  pg.destroy();
  scratch.remove();
}
