/**
 * Load mode: thousands of gateways from one process, for the ingest benchmark. Each gateway is
 * a full simulated site (the demo builds in turn, under fictional load-test names) with its own
 * MQTT connection, reporting on the wall clock. Connections open at a set rate; the result
 * counts connections, packs and readings acknowledged, and PUBACK latency percentiles.
 *
 * `provisionLoadGateways` registers the gateways (one company, one site per gateway) in a
 * database and returns their secrets; a benchmark that starts its own ingest calls it first.
 */
import { hashGatewaySecret, newGatewaySecret, type Database } from '@wellkept/db';
import { demoSites } from '../demo/scenario.js';
import { type GatewayCredentials, GatewayLink } from '../gateway/gateway-link.js';
import { SiteSimulation } from '../physics/site-simulation.js';
import type { SiteSpec } from '../site-spec.js';

export interface LoadGateway extends GatewayCredentials {
  /** Index of the demo build it simulates. */
  build: number;
}

/** Gateway id of load gateway `i` under a prefix, e.g. `load-a1b2-00042`. */
export function loadGatewayId(prefix: string, i: number): string {
  return `${prefix}-${String(i).padStart(5, '0')}`;
}

/**
 * Registers `count` gateways for load tests: one fictional company, a site and a gateway per
 * gateway, inserted in batches. Returns the secrets (kept only in memory or a git-ignored file).
 */
export async function provisionLoadGateways(
  db: Database,
  count: number,
  prefix = `load-${Math.random().toString(36).slice(2, 6)}`,
): Promise<LoadGateway[]> {
  if (!/^[a-z0-9][a-z0-9-]{0,50}$/.test(prefix)) {
    throw new Error(`load gateway prefix "${prefix}" must be lower-case letters, digits and -`);
  }
  const company = await db
    .insertInto('companies')
    .values({ name: `Load test fleet ${prefix}` })
    .returning('id')
    .executeTakeFirstOrThrow();
  const out: LoadGateway[] = [];
  const batch = 500;
  for (let from = 0; from < count; from += batch) {
    const size = Math.min(batch, count - from);
    const builds = Array.from({ length: size }, (_, k) => (from + k) % demoSites.length);
    const sites = await db
      .insertInto('sites')
      .values(
        builds.map((b, k) => {
          const template = demoSites[b]!;
          return {
            company_id: company.id,
            name: `Load site ${prefix} ${from + k}`,
            latitude: template.latitude,
            longitude: template.longitude,
            time_zone: template.timeZone,
          };
        }),
      )
      .returning('id')
      .execute();
    const rows = sites.map((site, k) => {
      const secret = newGatewaySecret();
      const gatewayId = loadGatewayId(prefix, from + k);
      out.push({ gatewayId, secret, build: builds[k]! });
      return { id: gatewayId, site_id: site.id, secret_hash: hashGatewaySecret(secret) };
    });
    await db.insertInto('gateways').values(rows).execute();
    const banks = builds
      .map((b, k) => ({ b, site: sites[k]! }))
      .filter(({ b }) => demoSites[b]!.battery)
      .map(({ b, site }) => ({
        site_id: site.id,
        chemistry: demoSites[b]!.battery!.chemistry,
        nominal_voltage_v: demoSites[b]!.battery!.nominalVoltageV,
        capacity_ah: demoSites[b]!.battery!.capacityAh,
      }));
    if (banks.length) await db.insertInto('battery_banks').values(banks).execute();
  }
  return out;
}

export interface LoadOptions {
  url: string;
  gateways: readonly (GatewayCredentials & { build?: number })[];
  /** Reporting interval, seconds. Default 30. */
  reportSeconds?: number;
  /** How long to run once every gateway has been started, seconds. */
  durationSeconds: number;
  /** New connections per second. Default 500. */
  connectsPerSecond?: number;
  /** Called every few seconds with the running figures. */
  onProgress?: (result: LoadResult) => void;
}

export interface LoadResult {
  gateways: number;
  connected: number;
  /** Seconds from the first connection attempt until every gateway had connected (or null). */
  allConnectedAfterSeconds: number | null;
  sentPacks: number;
  ackedPacks: number;
  ackedReadings: number;
  errors: number;
  /** Seconds of measurement. */
  seconds: number;
  readingsPerSecond: number;
  /** PUBACK latency, milliseconds. */
  latencyMs: { p50: number | null; p95: number | null; p99: number | null; max: number | null };
}

function percentile(sorted: readonly number[], p: number): number | null {
  if (sorted.length === 0) return null;
  return sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))]!;
}

/** The site a load gateway simulates: a demo build under the gateway's own id. */
function loadSite(gatewayId: string, build: number): SiteSpec {
  const template = demoSites[build % demoSites.length]!;
  const { faults: _faults, ...rest } = template;
  return { ...rest, key: gatewayId, gatewayId };
}

export async function runLoad(options: LoadOptions): Promise<LoadResult> {
  const report = options.reportSeconds ?? 30;
  const rate = options.connectsPerSecond ?? 500;
  const startWall = Date.now();
  const latencies: number[] = [];
  let errors = 0;
  let connected = 0;
  let allConnectedAt: number | null = null;
  const members = options.gateways.map((g, i) => {
    const link = new GatewayLink({
      url: options.url,
      credentials: g,
      keepaliveSeconds: 120,
      reconnectMs: 5000,
      maxPacksInFlight: 4,
    });
    link.on('acked', (ms) => latencies.push(ms));
    link.on('error', () => {
      errors += 1;
    });
    link.once('connect', () => {
      connected += 1;
      if (connected === options.gateways.length) allConnectedAt = Date.now();
    });
    const sim = new SiteSimulation(loadSite(g.gatewayId, g.build ?? i), {
      startT: startWall / 1000 - 3600,
      maxStepSeconds: 120,
    });
    // Spread the reports over the interval so the broker sees a steady stream.
    return { link, sim, phase: (i * 997) % (report * 1000) };
  });

  // Open connections at the given rate.
  for (let i = 0; i < members.length; i += 1) {
    members[i]!.link.start();
    if ((i + 1) % Math.max(1, Math.round(rate / 10)) === 0) {
      await new Promise((r) => setTimeout(r, 100));
    }
  }
  const measureFrom = Date.now();
  const until = measureFrom + options.durationSeconds * 1000;
  const next = members.map((m) => measureFrom + m.phase);
  const snapshot = (): LoadResult => {
    let sentPacks = 0;
    let ackedPacks = 0;
    let ackedReadings = 0;
    for (const m of members) {
      const s = m.link.stats();
      sentPacks += s.sentPacks;
      ackedPacks += s.ackedPacks;
      ackedReadings += s.ackedReadings;
    }
    const seconds = (Date.now() - measureFrom) / 1000;
    const sorted = [...latencies].sort((a, b) => a - b);
    return {
      gateways: members.length,
      connected,
      allConnectedAfterSeconds:
        allConnectedAt === null ? null : (allConnectedAt - startWall) / 1000,
      sentPacks,
      ackedPacks,
      ackedReadings,
      errors,
      seconds,
      readingsPerSecond: seconds > 0 ? ackedReadings / seconds : 0,
      latencyMs: {
        p50: percentile(sorted, 0.5),
        p95: percentile(sorted, 0.95),
        p99: percentile(sorted, 0.99),
        max: sorted.length ? sorted[sorted.length - 1]! : null,
      },
    };
  };
  let lastProgress = Date.now();
  while (Date.now() < until) {
    const now = Date.now();
    for (let i = 0; i < members.length; i += 1) {
      if (now < next[i]!) continue;
      next[i] = next[i]! + report * 1000;
      const m = members[i]!;
      m.sim.advanceTo(now / 1000);
      m.link.enqueue([...m.sim.takeSwitchEvents(), ...m.sim.readings()]);
    }
    if (options.onProgress && now - lastProgress > 5000) {
      lastProgress = now;
      options.onProgress(snapshot());
    }
    await new Promise((r) => setTimeout(r, 50));
  }
  const result = snapshot();
  await Promise.all(members.map((m) => m.link.stop()));
  return result;
}
