/**
 * Load generator for the ingest benchmark, run as its own process (so the broker under test
 * and the clients do not share one event loop): N MQTT.js gateways, each publishing 8-record
 * SenML packs at QoS 1, together at an offered rate. Writes the acknowledged (gateway, time)
 * pairs to a file and prints one JSON line of figures.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import mqtt, { type MqttClient } from 'mqtt';

interface Options {
  url: string;
  gatewaysFile: string;
  offeredPerSecond: number;
  durationS: number;
  warmupS: number;
  ackedFile: string;
  /** Unacknowledged packs a gateway may have before it waits (a gateway's own buffer). */
  maxInflight: number;
}

const options = JSON.parse(process.argv[2]!) as Options;
const gateways = JSON.parse(readFileSync(options.gatewaysFile, 'utf8')) as {
  id: string;
  secret: string;
}[];

function pack(id: string, t: number): string {
  return JSON.stringify([
    { bn: `urn:dev:wellkept:${id}:`, bt: t, n: 'battery/voltage', u: 'V', v: 25.6 },
    { n: 'battery/current', u: 'A', v: 4.2 },
    { n: 'battery/temperature', u: 'Cel', v: 23.5 },
    { n: 'pv/roof/voltage', u: 'V', v: 71.2 },
    { n: 'pv/roof/current', u: 'A', v: 6.1 },
    { n: 'pump/well/running', vb: true },
    { n: 'pump/well/current', u: 'A', v: 5.9 },
    { n: 'tank/main/level', u: 'm', v: 1.42 },
  ]);
}

interface Gateway {
  index: number;
  id: string;
  client: MqttClient;
  inflight: number;
  /** Time of the last pack, whole milliseconds (exact in the database and in the acked file). */
  lastMs: number;
}

async function connectAll(): Promise<Gateway[]> {
  const out: Gateway[] = [];
  const concurrency = 100;
  for (let i = 0; i < gateways.length; i += concurrency) {
    const slice = gateways.slice(i, i + concurrency);
    const connected = await Promise.all(
      slice.map(
        (g, j) =>
          new Promise<Gateway>((resolve, reject) => {
            const client = mqtt.connect(options.url, {
              clientId: g.id,
              username: g.id,
              password: g.secret,
              clean: false,
              protocolVersion: 4,
              keepalive: 120,
              reconnectPeriod: 1000,
              reconnectOnConnackError: true,
              connectTimeout: 60_000,
            });
            client.once('connect', () =>
              resolve({ index: i + j, id: g.id, client, inflight: 0, lastMs: 0 }),
            );
            client.once('error', reject);
          }),
      ),
    );
    out.push(...connected);
  }
  return out;
}

const started = Date.now();
const fleet = await connectAll();
const connectSeconds = (Date.now() - started) / 1000;

const latencies: number[] = [];
/** Per second of the measured window (by send time), the slowest acknowledgement, ms. */
const worstBySecond: number[] = [];
const acked: string[] = [];
let sent = 0;
let ackedInWindow = 0;
let errors = 0;
let cursor = 0;
const cpuBefore = process.cpuUsage();
const runStart = performance.now();
const windowStart = runStart + options.warmupS * 1000;
const runEnd = runStart + options.durationS * 1000;

await new Promise<void>((resolve) => {
  const tick = setInterval(() => {
    const now = performance.now();
    if (now >= runEnd) {
      clearInterval(tick);
      resolve();
      return;
    }
    let budget = Math.floor(((now - runStart) / 1000) * options.offeredPerSecond) - sent;
    let skipped = 0;
    while (budget > 0 && skipped < fleet.length) {
      const g = fleet[cursor]!;
      cursor = (cursor + 1) % fleet.length;
      if (g.inflight >= options.maxInflight || !g.client.connected) {
        skipped += 1;
        continue;
      }
      skipped = 0;
      budget -= 1;
      sent += 1;
      g.inflight += 1;
      // Unique, increasing whole-millisecond times per gateway.
      const ms = Math.max(Date.now(), g.lastMs + 1);
      g.lastMs = ms;
      const t = ms / 1000;
      const at = performance.now();
      g.client.publish(`gateways/${g.id}/senml`, pack(g.id, t), { qos: 1 }, (error) => {
        g.inflight -= 1;
        if (error) {
          errors += 1;
          return;
        }
        const done = performance.now();
        acked.push(`${g.index},${t.toFixed(3)}`);
        // Throughput counts acknowledgements that arrive in the window, whenever the pack was
        // sent: counting only packs sent after the warm-up would leave out, at saturation, the
        // first queue-latency's worth of the window and understate the rate.
        if (done >= windowStart && done <= runEnd) {
          ackedInWindow += 1;
          latencies.push(done - at);
          const second = Math.floor((at - windowStart) / 1000);
          if (second >= 0) worstBySecond[second] = Math.max(worstBySecond[second] ?? 0, done - at);
        }
      });
    }
  }, 5);
});

const cpu = process.cpuUsage(cpuBefore);
const runSeconds = (performance.now() - runStart) / 1000;

// Let the packs in flight finish (their acknowledgements count toward the missing-records check).
const drainUntil = Date.now() + 15_000;
while (fleet.some((g) => g.inflight > 0) && Date.now() < drainUntil) {
  await new Promise((r) => setTimeout(r, 100));
}
const ackedTotal = acked.length;
writeFileSync(options.ackedFile, acked.join('\n') + '\n');
// Forced: a gateway whose connection was refused (queue full) and is not back yet would otherwise
// wait for ever to deliver its unacknowledged packs; what was acknowledged is already written.
await Promise.all(fleet.map((g) => new Promise<void>((r) => g.client.end(true, {}, () => r()))));

latencies.sort((a, b) => a - b);
const pct = (p: number) =>
  latencies[Math.min(latencies.length - 1, Math.floor((p / 100) * latencies.length))] ?? NaN;
console.log(
  JSON.stringify({
    connections: fleet.length,
    connectSeconds,
    sent,
    acked: ackedTotal,
    errors,
    ackedPerSecond: ackedInWindow / (options.durationS - options.warmupS),
    latencyMs: { p50: pct(50), p95: pct(95), p99: pct(99) },
    worstBySecondMs: Array.from(worstBySecond, (ms) => Math.round(ms ?? 0)),
    generatorCpuPercent: (100 * (cpu.user + cpu.system)) / 1e6 / runSeconds,
  }),
);
process.exit(0);
