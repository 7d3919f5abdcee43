/**
 * Store-and-forward against the real ingest service: a simulated site reports in accelerated
 * time through a TCP relay; the relay is cut for an hour of simulated time (the gateway's link
 * really drops), then mended. Every reading generated must end up in the database exactly once.
 * Also: bad payloads are refused with reasons while the good records beside them are kept.
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { sql } from 'kysely';
import { useTestDatabase } from '@wellkept/db/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { OutgoingReading } from '@wellkept/core';
import { demoSites } from '../src/demo/scenario.js';
import { type DemoGatewayCredentials, seedDemo } from '../src/demo/seed.js';
import { BAD_PAYLOAD_KINDS, badPayload } from '../src/faults/bad-payloads.js';
import { GatewayLink } from '../src/gateway/gateway-link.js';
import { SiteSimulation } from '../src/physics/site-simulation.js';
import {
  LinkRelay,
  type RunningIngest,
  startTestIngest,
  storedReadings,
  waitFor,
} from './support/ingest.js';

const test = useTestDatabase('sim_saf');
let ingest: RunningIngest;
let gateways: DemoGatewayCredentials[];

beforeAll(async () => {
  const file = join(mkdtempSync(join(tmpdir(), 'wk-sim-')), 'gateways.json');
  gateways = (await seedDemo(test.db, file)).gateways;
  ingest = await startTestIngest(test.url);
});

afterAll(async () => {
  await ingest?.close();
});

function gatewayOf(siteKey: string): DemoGatewayCredentials {
  return gateways.find((g) => g.siteKey === siteKey)!;
}

describe('store-and-forward through the real ingest', () => {
  it('keeps readings while the link is cut for an hour and delivers every one afterwards', async () => {
    const site = demoSites.find((s) => s.key === 'pinon-ridge')!;
    const gw = gatewayOf(site.key);
    const relay = new LinkRelay(ingest.mqttPort);
    await relay.listen();
    const link = new GatewayLink({
      url: `mqtt://127.0.0.1:${relay.port}`,
      credentials: gw,
      reconnectMs: 200,
      keepaliveSeconds: 10,
    });
    link.start();
    await waitFor(async () => link.connected, 10_000, 'the first connection');

    // Three simulated hours at 30 s intervals, 30 simulated seconds every 15 ms of wall time
    // (2000× real time); the link is down from the first hour to the second.
    const report = 30;
    const startT = Math.floor(Date.now() / 1000) - 3 * 3600;
    const sim = new SiteSimulation(site, { startT: startT - 86_400 });
    sim.advanceTo(startT);
    sim.takeSwitchEvents();
    const expected = new Map<string, OutgoingReading>();
    let largestQueueWhileCut = 0;
    for (let t = startT + report; t <= startT + 3 * 3600; t += report) {
      if (t === startT + 3600) relay.cut();
      if (t === startT + 2 * 3600) relay.mend();
      sim.advanceTo(t);
      const readings = [...sim.takeSwitchEvents(), ...sim.readings()];
      for (const r of readings) expected.set(`${r.name}@${r.t}`, r);
      link.enqueue(readings);
      if (t > startT + 3600 && t < startT + 2 * 3600) {
        largestQueueWhileCut = Math.max(largestQueueWhileCut, link.stats().queued);
      }
      await new Promise((r) => setTimeout(r, 15));
    }
    await link.drained(60_000);

    const stats = link.stats();
    // The link really went down: readings piled up in the queue and the gateway reconnected.
    expect(largestQueueWhileCut).toBeGreaterThan(1000);
    expect(stats.connects).toBeGreaterThanOrEqual(2);
    expect(stats.droppedReadings).toBe(0);

    const rows = await storedReadings(test.db, gw.siteId);
    expect(rows.length).toBe(expected.size);
    for (const row of rows) {
      const t = row.time.getTime() / 1000;
      const want = expected.get(`${row.name}@${t}`);
      expect(want, `${row.name} at ${row.time.toISOString()}`).toBeDefined();
      if (typeof want!.value === 'number') expect(row.value).toBeCloseTo(want!.value, 6);
      else if (typeof want!.value === 'string') expect(row.text_value).toBe(want!.value);
      else expect(row.value).toBe(want!.value ? 1 : 0);
    }
    await link.stop();
    await relay.close();
  }, 120_000);

  it('bounds the buffer: the oldest readings are dropped first and counted', async () => {
    const site = demoSites.find((s) => s.key === 'cedar-spring')!;
    const gw = gatewayOf(site.key);
    const link = new GatewayLink({
      url: `mqtt://127.0.0.1:${ingest.mqttPort}`,
      credentials: gw,
      maxQueuedReadings: 500,
    });
    // Link down from the start: the gateway keeps only the newest 500 readings.
    await link.setLinkUp(false);
    const startT = Math.floor(Date.now() / 1000) - 2 * 3600;
    const sim = new SiteSimulation(site, { startT });
    const all: OutgoingReading[] = [];
    for (let t = startT + 60; t <= startT + 2 * 3600; t += 60) {
      sim.advanceTo(t);
      const readings = [...sim.takeSwitchEvents(), ...sim.readings()];
      all.push(...readings);
      link.enqueue(readings);
    }
    expect(link.stats().queued).toBe(500);
    expect(link.stats().droppedReadings).toBe(all.length - 500);
    await link.setLinkUp(true);
    await link.drained(30_000);
    const rows = await storedReadings(test.db, gw.siteId);
    const kept = all.slice(-500);
    expect(rows.length).toBe(500);
    const oldestKept = Math.min(...kept.map((r) => r.t));
    expect(Math.min(...rows.map((r) => r.time.getTime() / 1000))).toBe(oldestKept);
    await link.stop();
  }, 60_000);

  it('sends bad payloads that ingest refuses with reasons, keeping the good records beside them', async () => {
    const site = demoSites.find((s) => s.key === 'saltbush-tank')!;
    const gw = gatewayOf(site.key);
    const link = new GatewayLink({ url: `mqtt://127.0.0.1:${ingest.mqttPort}`, credentials: gw });
    const notices: unknown[] = [];
    link.on('reject', (n) => notices.push(n));
    link.start();
    await waitFor(async () => link.connected, 10_000, 'the connection');
    // Give the subscription to the rejects topic time to be in place.
    await new Promise((r) => setTimeout(r, 300));
    const nowT = Math.floor(Date.now() / 1000);
    const goodTimes: number[] = [];
    for (const [i, kind] of BAD_PAYLOAD_KINDS.entries()) {
      const t = nowT - 600 + i * 10;
      if (kind !== 'not_json' && kind !== 'nan_value') goodTimes.push(t);
      const good: OutgoingReading = { name: 'battery/temperature', t, value: 21.5 };
      link.publishRaw(badPayload(kind, gw.gatewayId, good, 'header', nowT));
    }
    await waitFor(async () => notices.length >= BAD_PAYLOAD_KINDS.length, 10_000, 'reject notices');
    const stats = link.stats();
    // Not JSON and NaN (which is not JSON either) refuse the whole pack; the other three
    // refuse one record each.
    expect(stats.rejectedPacks).toBe(2);
    expect(stats.rejectedRecords).toBe(3);

    const rejects = await sql<{ reason: string }>`
      select reason from ingest_rejects where gateway_id = ${gw.gatewayId}`.execute(test.db);
    const reasons = rejects.rows.map((r) => r.reason).join('\n');
    expect(reasons).toMatch(/unit/);
    expect(reasons).toMatch(/912/);
    expect(reasons).toMatch(/future/);
    expect(reasons).toMatch(/JSON/);

    // The good records of the three parseable packs are stored.
    const rows = await storedReadings(test.db, gw.siteId);
    const stored = rows
      .filter((r) => r.name === 'battery/temperature')
      .map((r) => r.time.getTime() / 1000);
    expect(stored.sort()).toEqual(goodTimes.sort());
    await link.stop();
  }, 60_000);
});
