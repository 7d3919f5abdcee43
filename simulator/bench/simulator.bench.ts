/**
 * Simulator benchmark (`npm run bench -w simulator`; figures printed, nothing asserted).
 *
 *  (a) physics: one simulated year at 60-s steps for each demo build, seconds of wall time;
 *  (b) history backfill: the eight demo sites, BENCH_BACKFILL_HOURS (default 24) of history at
 *      60-s reports, into the real ingest (ingest/dist/main.js) on a PostgreSQL of its own:
 *      readings acknowledged per second;
 *  (c) load mode: BENCH_GATEWAYS (default 2,000) gateways from this one process, reporting every
 *      BENCH_INTERVAL seconds (default 10) for BENCH_SECONDS (default 30): connection ramp,
 *      readings acknowledged per second, PUBACK latency, and this process's memory.
 */
import { spawn } from 'node:child_process';
import { existsSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { createDb, dataRoot, freePort, repoRoot, startThrowawayCluster } from '@wellkept/db';
import { demoSites } from '../src/demo/scenario.js';
import { seedDemo } from '../src/demo/seed.js';
import { Fleet } from '../src/modes/fleet.js';
import { provisionLoadGateways, runLoad } from '../src/modes/load.js';
import { SiteSimulation } from '../src/physics/site-simulation.js';

const BACKFILL_HOURS = Number(process.env.BENCH_BACKFILL_HOURS ?? 24);
const GATEWAYS = Number(process.env.BENCH_GATEWAYS ?? 2000);
const INTERVAL = Number(process.env.BENCH_INTERVAL ?? 10);
const SECONDS = Number(process.env.BENCH_SECONDS ?? 30);

console.log('(a) physics: one year at 60-s steps');
let total = 0;
for (const site of demoSites) {
  const start = Date.UTC(2026, 0, 1) / 1000;
  const t0 = performance.now();
  const sim = new SiteSimulation(site, { startT: start });
  sim.advanceTo(start + 365 * 86_400);
  const seconds = (performance.now() - t0) / 1000;
  total += seconds;
  console.log(`  ${site.key.padEnd(18)} ${seconds.toFixed(2)} s`);
}
console.log(
  `  all eight           ${total.toFixed(2)} s (${(total / 8).toFixed(2)} s a site-year)`,
);

const ingestEntry = join(repoRoot, 'ingest/dist/main.js');
if (!existsSync(ingestEntry)) {
  console.log('(b), (c): ingest/dist/main.js is missing; build with `npx tsc -b` first');
  process.exit(0);
}
const cluster = await startThrowawayCluster({ prefix: 'bench-sim' });
const mqttPort = await freePort();
const ingest = spawn(process.execPath, [ingestEntry], {
  cwd: repoRoot,
  env: {
    ...process.env,
    DATABASE_URL: cluster.databaseUrl,
    MQTT_PORT: String(mqttPort),
    MQTT_WS_PORT: String(await freePort()),
    INGEST_HTTP_PORT: String(await freePort()),
    INGEST_HOST: '127.0.0.1',
    LOG_LEVEL: 'warn',
  },
  stdio: ['ignore', 'inherit', 'inherit'],
});
const db = createDb(cluster.databaseUrl, { max: 2 });
const credentialsFile = join(dataRoot(), `bench-sim-${process.pid}.json`);
try {
  await new Promise((r) => setTimeout(r, 3000));
  const url = `mqtt://127.0.0.1:${mqttPort}`;
  const seeded = await seedDemo(db, credentialsFile);
  const secrets = new Map(seeded.gateways.map((g) => [g.gatewayId, g]));
  const nowT = Date.now() / 1000;
  const fleet = new Fleet({
    url,
    sites: demoSites.map((site) => ({ site, credentials: secrets.get(site.gatewayId)! })),
    faults: [],
    startT: nowT - BACKFILL_HOURS * 3600,
    reportSeconds: 60,
  });
  fleet.connect();
  const t0 = performance.now();
  await fleet.backfill(nowT);
  const seconds = (performance.now() - t0) / 1000;
  const acked = fleet.stats().reduce((n, s) => n + s.link.ackedReadings, 0);
  console.log(`(b) backfill: ${BACKFILL_HOURS} h of 8 sites at 60-s reports`);
  console.log(
    `  ${acked} readings acknowledged in ${seconds.toFixed(1)} s: ${Math.round(acked / seconds)} readings/s` +
      ` (30 days of the demo would take about ${((acked * (720 / BACKFILL_HOURS)) / (acked / seconds) / 60).toFixed(1)} min)`,
  );
  await fleet.stop();

  const gateways = await provisionLoadGateways(db, GATEWAYS, `bench-${process.pid}`);
  const rssBefore = process.memoryUsage().rss;
  const result = await runLoad({
    url,
    gateways,
    reportSeconds: INTERVAL,
    durationSeconds: SECONDS,
  });
  const rss = process.memoryUsage().rss;
  console.log(`(c) load: ${GATEWAYS} gateways every ${INTERVAL} s for ${SECONDS} s`);
  console.log(
    `  connected ${result.connected}/${result.gateways}` +
      (result.allConnectedAfterSeconds !== null
        ? ` in ${result.allConnectedAfterSeconds.toFixed(1)} s`
        : '') +
      `; ${result.ackedReadings} readings acknowledged, ${result.readingsPerSecond.toFixed(0)}/s` +
      ` (offered ${((GATEWAYS / INTERVAL) * 15).toFixed(0)}/s, ratio ${(result.readingsPerSecond / ((GATEWAYS / INTERVAL) * 15)).toFixed(2)})`,
  );
  console.log(
    `  PUBACK p50 ${result.latencyMs.p50?.toFixed(0)} ms, p95 ${result.latencyMs.p95?.toFixed(0)} ms, p99 ${result.latencyMs.p99?.toFixed(0)} ms; ` +
      `errors ${result.errors}; simulator RSS ${(rss / 2 ** 20).toFixed(0)} MB (+${((rss - rssBefore) / 2 ** 20).toFixed(0)} MB for the gateways)`,
  );
} finally {
  await db.destroy();
  // Ingest drains on SIGTERM; give it ten seconds, then stop it hard.
  const exited = new Promise((r) => ingest.once('exit', r));
  ingest.kill('SIGTERM');
  const timer = setTimeout(() => ingest.kill('SIGKILL'), 10_000);
  await exited;
  clearTimeout(timer);
  await cluster.destroy();
  rmSync(credentialsFile, { force: true });
}
