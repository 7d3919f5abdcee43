/**
 * The gateway side of the load run, in its own process (so the measuring process's event loop
 * stays free): N MQTT.js gateways connect, then each publishes one 8-record SenML pack at QoS 1
 * every reporting interval, at its own phase. Prints one JSON line of figures every few seconds
 * and a last one (`"final": true`) after the packs in flight are answered.
 *
 * argv[2]: JSON { url, gatewaysFile, intervalS, durationS }.
 * Send "stop" on stdin (or reach durationS) to finish.
 */
import { readFileSync } from 'node:fs';
import mqtt, { type MqttClient } from 'mqtt';

interface Options {
  url: string;
  gatewaysFile: string;
  intervalS: number;
  durationS: number;
}

const options = JSON.parse(process.argv[2]!) as Options;
const gateways = JSON.parse(readFileSync(options.gatewaysFile, 'utf8')) as {
  gatewayId: string;
  secret: string;
}[];

function pack(id: string, t: number): string {
  return JSON.stringify([
    { bn: `urn:dev:wellkept:${id}:`, bt: t, n: 'battery/voltage', u: 'V', v: 25.6 },
    { n: 'battery/current', u: 'A', v: 4.2 },
    { n: 'battery/temperature', u: 'Cel', v: 23.5 },
    { n: 'pv/roof/voltage', u: 'V', v: 71.2 },
    { n: 'pv/roof/current', u: 'A', v: 6.1 },
    { n: 'pump/well/running', vb: false },
    { n: 'pump/well/current', u: 'A', v: 0 },
    { n: 'tank/main/level', u: 'm', v: 1.42 },
  ]);
}

const figures = {
  connected: 0,
  published: 0,
  acked: 0,
  /** Publishes answered with an error (connection closed before the PUBACK). */
  publishErrors: 0,
  /** Client errors and unexpected closes. */
  connectionErrors: 0,
  closes: 0,
};
const latencies: number[] = [];
const clients: MqttClient[] = [];
let publishing = true;

function connect(g: { gatewayId: string; secret: string }): Promise<MqttClient> {
  return new Promise((resolve) => {
    const client = mqtt.connect(options.url, {
      clientId: g.gatewayId,
      username: g.gatewayId,
      password: g.secret,
      clean: false,
      protocolVersion: 4,
      keepalive: 120,
      reconnectPeriod: 2000,
      reconnectOnConnackError: true,
      connectTimeout: 60_000,
    });
    client.on('error', () => (figures.connectionErrors += 1));
    client.on('close', () => {
      if (publishing) figures.closes += 1;
    });
    client.once('connect', () => {
      figures.connected += 1;
      resolve(client);
    });
  });
}

function schedule(client: MqttClient, id: string): void {
  // Each gateway keeps its own phase inside the interval, as real ones do.
  const first = Math.random() * options.intervalS * 1000;
  let lastMs = 0;
  const send = () => {
    if (!publishing) return;
    const ms = Math.max(Date.now(), lastMs + 1);
    lastMs = ms;
    const at = performance.now();
    figures.published += 1;
    client.publish(`gateways/${id}/senml`, pack(id, ms / 1000), { qos: 1 }, (error) => {
      if (error) {
        figures.publishErrors += 1;
        return;
      }
      figures.acked += 1;
      latencies.push(performance.now() - at);
    });
  };
  setTimeout(() => {
    send();
    const timer = setInterval(
      () => (publishing ? send() : clearInterval(timer)),
      options.intervalS * 1000,
    );
  }, first);
}

function percentile(sorted: number[], p: number): number | null {
  if (sorted.length === 0) return null;
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))]!;
}

function report(final: boolean): void {
  const sorted = [...latencies].sort((a, b) => a - b);
  console.log(
    JSON.stringify({
      final,
      ...figures,
      inflight: figures.published - figures.acked - figures.publishErrors,
      ackMs: {
        p50: percentile(sorted, 50),
        p95: percentile(sorted, 95),
        p99: percentile(sorted, 99),
        max: sorted.at(-1) ?? null,
      },
      rssBytes: process.memoryUsage().rss,
    }),
  );
}

const connectStarted = Date.now();
// Connect in waves, as a fleet coming back after an outage would, without a thundering herd.
const wave = 250;
for (let i = 0; i < gateways.length; i += wave) {
  const slice = gateways.slice(i, i + wave);
  const connected = await Promise.all(slice.map(connect));
  connected.forEach((client, j) => {
    clients.push(client);
    schedule(client, slice[j]!.gatewayId);
  });
}
console.log(
  JSON.stringify({ connectedAll: clients.length, connectMs: Date.now() - connectStarted }),
);
const ticker = setInterval(() => report(false), 5000);

const stop = async () => {
  if (!publishing) return;
  publishing = false;
  clearInterval(ticker);
  const until = Date.now() + 30_000;
  while (figures.published - figures.acked - figures.publishErrors > 0 && Date.now() < until) {
    await new Promise((r) => setTimeout(r, 100));
  }
  report(true);
  await Promise.all(clients.map((c) => new Promise<void>((r) => c.end(true, {}, () => r()))));
  process.exit(0);
};
process.stdin.on('data', (d) => {
  if (d.toString().includes('stop')) void stop();
});
setTimeout(() => void stop(), options.durationS * 1000);
