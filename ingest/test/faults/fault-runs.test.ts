import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  FAULTS,
  runFaults,
  type FaultName,
  type FaultRow,
} from '../../../scripts/faults/fault-run.js';
import { faultTable } from '../../../scripts/faults/report-table.js';

/*
 * The short version of `npm run faults` (issue 9): the real ingest and API as child processes,
 * a durable PostgreSQL of this file's own, the SMTP catcher, MQTT.js gateways logging every
 * PUBACK and dashboards holding event streams. Each fault runs briefly, in turn; the checks wait
 * for things to settle (acknowledgements, roll-up, mail) but never assert on time.
 */
let rows: FaultRow[] = [];

/** Every fault of `npm run faults`, each briefly. */
const SHORT_FAULTS = FAULTS;

beforeAll(async () => {
  rows = await runFaults({
    faults: SHORT_FAULTS,
    gateways: 3,
    packsPerSecond: 4,
    mailSites: 2,
    sseClients: 2,
    beforeMs: 800,
    holdMs: 1500,
    afterMs: 1000,
    settleMs: 60_000,
    prefix: 'test',
    log: () => undefined,
  });
  console.log(faultTable(rows));
}, 400_000);

afterAll(() => undefined);

function row(fault: FaultName): FaultRow {
  const found = rows.find((r) => r.fault === fault);
  if (!found) throw new Error(`no figures for ${fault}`);
  return found;
}

describe.each(SHORT_FAULTS)('fault: %s', (fault) => {
  it('loses no acknowledged pack and stores re-sent ones once', () => {
    const r = row(fault);
    expect(r.telemetry.acknowledged).toBeGreaterThan(0);
    expect(r.telemetry.missing).toBe(0);
    expect(r.telemetry.missingExamples).toEqual([]);
    expect(r.telemetry.duplicateRows).toBe(0);
    // Deliberate repeats and re-sends happened, and none of them was stored twice.
    expect(r.telemetry.resent).toBeGreaterThan(0);
    expect(r.telemetry.stored).toBeGreaterThanOrEqual(r.telemetry.acknowledged);
  });

  it('keeps buckets and pump runs equal to a recomputation from raw rows', () => {
    const r = row(fault);
    expect(r.buckets.compared).toBeGreaterThan(0);
    expect(r.buckets.examples).toEqual([]);
    expect(r.buckets.mismatched).toBe(0);
    expect(r.pumpRuns.compared).toBeGreaterThan(0);
    expect(r.pumpRuns.examples).toEqual([]);
    expect(r.pumpRuns.mismatched).toBe(0);
  });

  it('delivers every alert mail exactly once', () => {
    const r = row(fault);
    expect(r.mail).toMatchObject({ eventsPending: 0, unsent: 0, duplicated: 0, lost: 0 });
    expect(r.mail.delivered).toBe(r.mail.outbox);
  });

  it('recovers, and every live event stream hears of new data', () => {
    const r = row(fault);
    expect(r.recoveryMs).not.toBeNull();
    expect(r.sse.resumed).toBe(r.sse.clients);
    expect(r.problems).toEqual([]);
  });
});
