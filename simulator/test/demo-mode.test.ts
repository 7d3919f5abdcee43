/**
 * The demo mode `npm start` runs, against the real ingest: a first run backfills history with
 * the demo's faults under way, then goes live; a second run resumes where the first stopped
 * instead of sending the history again.
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { sql } from 'kysely';
import { useTestDatabase } from '@wellkept/db/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { type DemoGatewayCredentials, seedDemo } from '../src/demo/seed.js';
import { runDemo } from '../src/modes/demo.js';
import { type RunningIngest, startTestIngest } from './support/ingest.js';

const test = useTestDatabase('sim_demo');
const dir = mkdtempSync(join(tmpdir(), 'wk-sim-demo-'));
const gatewaysFile = join(dir, 'gateways.json');
const stateFile = join(dir, 'state.json');
let ingest: RunningIngest;
let gateways: DemoGatewayCredentials[];

beforeAll(async () => {
  gateways = (await seedDemo(test.db, gatewaysFile)).gateways;
  ingest = await startTestIngest(test.url);
});

afterAll(async () => {
  await ingest?.close();
});

/** Runs the demo until it is live, lets it run `liveMs`, stops it; returns its log. */
async function demoUntilLive(liveMs: number): Promise<string[]> {
  const lines: string[] = [];
  let stop!: () => void;
  const stopSignal = new Promise<void>((resolve) => (stop = resolve));
  let live!: () => void;
  const isLive = new Promise<void>((resolve) => (live = resolve));
  const run = runDemo({
    url: `mqtt://127.0.0.1:${ingest.mqttPort}`,
    gatewaysFile,
    stateFile,
    historySpanSeconds: 3 * 3600,
    historySeconds: 60,
    reportSeconds: 5,
    log: (line) => {
      lines.push(line);
      if (line.includes('now running in real time')) live();
    },
    stopSignal,
  });
  await Promise.race([isLive, run]);
  await new Promise((r) => setTimeout(r, liveMs));
  stop();
  await run;
  return lines;
}

async function readingCounts(): Promise<Map<string, number>> {
  const { rows } = await sql<{ gateway_id: string; n: string }>`
    select g.id as gateway_id, count(r.*) as n from gateways g
    left join readings r on r.site_id = g.site_id group by g.id`.execute(test.db);
  return new Map(rows.map((r) => [r.gateway_id, Number(r.n)]));
}

describe('the demo mode', () => {
  it('backfills history with the faults under way, goes live, and resumes after a restart', async () => {
    const first = await demoUntilLive(6000);
    expect(first.join('\n')).toMatch(/first run: sending/);
    const counts = await readingCounts();
    // Three hours at one-minute history, about 15 readings a report, for every site but the
    // one whose radio link is down (gateway_offline since six hours before the demo began).
    for (const g of gateways) {
      if (g.gatewayId === 'gw-dune-gate') expect(counts.get(g.gatewayId)).toBe(0);
      else expect(counts.get(g.gatewayId), g.gatewayId).toBeGreaterThan(150 * 10);
    }
    // Saltbush sends bad payloads; ingest refused them with reasons.
    const rejects = await sql<{ n: string }>`
      select count(*) as n from ingest_rejects where gateway_id = 'gw-saltbush'`.execute(test.db);
    expect(Number(rejects.rows[0]!.n)).toBeGreaterThan(0);
    // The float stuck closed at Red Mesa (since a day before the demo began) reads closed in
    // every stored reading, and its pump runs with it.
    const north = await sql<{ value: number }>`
      select r.value from readings r join channels c on c.id = r.channel_id
      join gateways g on g.site_id = r.site_id
      where g.id = 'gw-red-mesa' and c.name = 'float/north-float/closed'`.execute(test.db);
    expect(north.rows.length).toBeGreaterThan(100);
    expect(north.rows.every((r) => r.value === 1)).toBe(true);
    const state = JSON.parse(readFileSync(stateFile, 'utf8')) as {
      ackedThroughT: Record<string, number>;
    };
    expect(state.ackedThroughT['gw-cedar-spring']).toBeGreaterThan(Date.now() / 1000 - 60);

    const second = await demoUntilLive(3000);
    const resumed = second.find((l) => l.startsWith('resuming'));
    expect(resumed).toBeDefined();
    // Only the minutes since the first run stopped are sent again, not the history.
    const hours = Number(/last ([\d.]+) h/.exec(resumed!)![1]);
    expect(hours).toBeLessThan(0.1);
    const after = await readingCounts();
    expect(after.get('gw-cedar-spring')!).toBeGreaterThan(counts.get('gw-cedar-spring')!);
    expect(after.get('gw-cedar-spring')!).toBeLessThan(counts.get('gw-cedar-spring')! + 400);
  }, 180_000);
});
