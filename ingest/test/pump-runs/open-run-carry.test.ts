import { useTestDatabase } from '@wellkept/db/testing';
import { sql } from 'kysely';
import type { MqttClient } from 'mqtt';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { PumpRunsRepository } from '../../src/pump-runs/pump-runs.repository.js';
import {
  baseName,
  connectGateway,
  publishAcked,
  seedSite,
  startTestIngest,
  type RunningIngest,
  type SeededSite,
} from '../support/ingest-harness.js';
import { runsFromEverySample } from './support/runs-from-every-sample.js';

const database = useTestDatabase('ingest_open_run_carry');
let ingest: RunningIngest;
let site: SeededSite;
let client: MqttClient;

const MINUTE = 60;
const GAP = 600;
/** The pump switched on three hours ago (5 s into a minute) and is still on. */
const startedAt = Math.floor(Date.now() / 1000 / MINUTE) * MINUTE - 3 * 3600 + 5;
/** Where the roll-up is set back to: an hour into the run. */
const watermark = startedAt - 5 + 3600;

/** Every 30 s from a minute before the start to two minutes ago: off once, then on. */
const times: number[] = [];
for (let t = startedAt - 60; t < Date.now() / 1000 - 120; t += 30) times.push(t);
const ampsAt = (i: number) => 5 + (i % 7) / 10;

async function publish(records: object[]) {
  await publishAcked(
    client,
    `gateways/${site.gatewayId}/senml`,
    JSON.stringify([{ bn: baseName(site.gatewayId) }, ...records]),
  );
}

/** The pump's runs derived from every stored sample at once (no carry). */
const derivedFromEverySample = () =>
  runsFromEverySample(database.db, { siteId: site.siteId, key: 'well', ratedCurrentA: 8 });

async function storedRuns() {
  return database.db
    .selectFrom('pump_runs')
    .select(['started_at', 'ended_at', 'mean_current_a', 'spans_gap', 'open_run_carry'])
    .where('pump_id', '=', site.pumpId)
    .orderBy('started_at')
    .execute();
}

/** Runs a sweep and returns where each of its sample reads began, seconds. */
async function sweepReadingFrom(): Promise<number[]> {
  return (await sweepReading()).map((read) => read.from);
}

/** Runs a sweep and returns the time span of each of its sample reads, seconds. */
async function sweepReading(): Promise<{ from: number; before: number }[]> {
  const samples = vi.spyOn(ingest.app.get(PumpRunsRepository), 'samples');
  try {
    await ingest.sweep();
    return samples.mock.calls.map(([wanted]) => ({
      from: wanted[0]!.from.getTime() / 1000,
      before: wanted[0]!.before!.getTime() / 1000,
    }));
  } finally {
    samples.mockRestore();
  }
}

/** Publishes the samples at `times[i]` with from <= times[i] < to, 40 times to a pack. */
async function publishSamples(from: number, to: number) {
  const indices = times.flatMap((t, i) => (t >= from && t < to ? [i] : []));
  for (let k = 0; k < indices.length; k += 40) {
    await publish(
      indices.slice(k, k + 40).flatMap((i) => {
        const t = times[i]!;
        return [
          { n: 'pump/well/running', t, vb: t >= startedAt },
          { n: 'pump/well/current', u: 'A', t, v: t >= startedAt ? ampsAt(i) : 0 },
          { n: 'battery/voltage', u: 'V', t, v: 25 + (i % 5) / 10 },
        ];
      }),
    );
  }
}

beforeAll(async () => {
  ingest = await startTestIngest(database.url);
  site = await seedSite(database.db);
  client = await connectGateway(ingest.mqttUrl, site);
  await ingest.sweep(); // starts the watermark at "now"
  // The run's first hour arrives (late) and is swept: the run is stored, open.
  await publishSamples(0, watermark);
  await ingest.sweep();
  // The rest, as if it had come in on time while the roll-up stood an hour into the run: the
  // next sweep rolls the two hours since up, ten minutes a transaction, continuing the run.
  await publishSamples(watermark, Number.POSITIVE_INFINITY);
  await sql`delete from rollup_pending where minute >= to_timestamp(${watermark})`.execute(
    database.db,
  );
  await sql`update rollup_state set watermark = to_timestamp(${watermark})`.execute(database.db);
});

afterAll(async () => {
  client?.end(true);
  await ingest?.close();
});

describe('a pump left on, continued sweep after sweep', () => {
  it('reads the run once from its start, then only from where the last sweep stopped', async () => {
    const reads = await sweepReading();
    const from = reads.map((read) => read.from);
    expect(from.length).toBeGreaterThanOrEqual(10);
    // Each read stops at the end of the ten minutes it rolls up (the watermark it moves to), not
    // at the newest sample: a catch-up reads each ten minutes once.
    reads.slice(0, -1).forEach((read, i) => {
      expect(read.before).toBe(watermark + (i + 1) * 10 * MINUTE);
    });
    // The first ten minutes rolled up: the run from its start (and the gap before it), as the
    // carry kept by the sweep before reached past them (to that sweep's watermark).
    expect(from[0]).toBe(startedAt - GAP);
    // Each later one: from the previous ten minutes' end, less the gap.
    from.slice(1).forEach((t, i) => expect(t).toBe(watermark + (i + 1) * 10 * MINUTE - GAP));

    const [run, ...others] = await storedRuns();
    expect(others).toEqual([]);
    const [expected] = await derivedFromEverySample();
    expect(run).toMatchObject({
      started_at: new Date(startedAt * 1000),
      ended_at: null,
      spans_gap: false,
    });
    expect(run!.mean_current_a).toBeCloseTo(expected!.meanCurrentA!, 9);
    const { rows } = await sql<{ watermark: Date }>`
      select watermark from rollup_state`.execute(database.db);
    expect(run!.open_run_carry).toMatchObject({
      startedAt,
      through: rows[0]!.watermark.getTime() / 1000,
    });
  });

  it('reads from the start again when a late sample lands before the carry', async () => {
    // A late current sample of 100 A an hour into the run: the carry does not hold it.
    await publish([{ n: 'pump/well/current', u: 'A', t: startedAt + 3600 + 15, v: 100 }]);
    const before = (await storedRuns())[0]!.mean_current_a!;

    const from = await sweepReadingFrom();
    expect(from).toEqual([startedAt - GAP]);
    const [run] = await storedRuns();
    const [expected] = await derivedFromEverySample();
    expect(run!.mean_current_a).toBeGreaterThan(before);
    expect(run!.mean_current_a).toBeCloseTo(expected!.meanCurrentA!, 9);
    expect(run!.ended_at).toBeNull();
  });

  it('ends the run with figures from every sample when the switch goes off', async () => {
    const off = times.at(-1)! + 15;
    await publish([
      { n: 'pump/well/running', t: off, vb: false },
      { n: 'pump/well/current', u: 'A', t: off, v: 0 },
    ]);
    const from = await sweepReadingFrom();
    expect(from).toEqual([startedAt - GAP]);

    const [run] = await storedRuns();
    const [expected] = await derivedFromEverySample();
    expect(run).toMatchObject({
      ended_at: new Date(off * 1000),
      open_run_carry: null,
    });
    expect(run!.mean_current_a).toBeCloseTo(expected!.meanCurrentA!, 9);
  });
});
