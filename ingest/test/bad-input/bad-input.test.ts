import { createConnection, type Socket } from 'node:net';
import type { Database } from '@wellkept/db';
import { useTestDatabase } from '@wellkept/db/testing';
import { sql } from 'kysely';
import type { MqttClient } from 'mqtt';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  baseName,
  connectGateway,
  seedSite,
  startTestIngest,
  type RunningIngest,
  type SeededSite,
} from '../support/ingest-harness.js';
import {
  connectPacket,
  PAYLOAD_CASES,
  publishPacket,
  RAW_CASES,
  WRONG_TOPICS,
  type PayloadCase,
} from './corpus.js';

const MAX_PACKET_BYTES = 256 * 1024;
const database = useTestDatabase('ingest_bad_input');
let ingest: RunningIngest;
let mqttPort: number;
/** Sends the payload corpus. */
let sender: SeededSite;
/** Writes raw packets and wrong topics. */
let raw: SeededSite;
/** A well-behaved gateway that must keep getting PUBACKs between the bad cases. */
let witness: SeededSite;
let witnessClient: MqttClient;
let witnessCount = 0;

beforeAll(async () => {
  ingest = await startTestIngest(database.url, {
    maxPacketBytes: MAX_PACKET_BYTES,
    // This file reconnects the same gateways many times on purpose (abuse.test.ts covers the
    // connect limit).
    gatewayLimits: { connectBurst: 10_000 },
  });
  mqttPort = Number(new URL(ingest.mqttUrl).port);
  sender = await seedSite(database.db);
  raw = await seedSite(database.db);
  witness = await seedSite(database.db);
  witnessClient = await connectGateway(ingest.mqttUrl, witness);
});

afterAll(async () => {
  witnessClient?.end(true);
  await ingest?.close();
});

/** The witness publishes one good reading; the broker must still acknowledge and store it. */
async function brokerStillServes(): Promise<void> {
  witnessCount += 1;
  const t = Math.floor(Date.now() / 1000) - 86_400 + witnessCount;
  const outcome = await publishOrClose(
    witnessClient,
    `gateways/${witness.gatewayId}/senml`,
    JSON.stringify([
      { bn: baseName(witness.gatewayId), bt: t, n: 'battery/voltage', u: 'V', v: 25 },
    ]),
  );
  expect(outcome, 'the well-behaved gateway got its PUBACK').toBe('acked');
}

/** Publishes at QoS 1: 'acked' on PUBACK, 'closed' when the broker closes the connection. */
function publishOrClose(
  client: MqttClient,
  topic: string,
  payload: string | Buffer,
): Promise<'acked' | 'closed'> {
  return new Promise((resolve) => {
    const onClose = () => resolve('closed');
    client.once('close', onClose);
    client.publish(topic, payload, { qos: 1 }, (error) => {
      client.off('close', onClose);
      resolve(error ? 'closed' : 'acked');
    });
  });
}

async function readingCount(db: Database, siteId: string): Promise<number> {
  const { rows } = await sql<{ n: number }>`
    select count(*)::int as n from readings where site_id = ${siteId}`.execute(db);
  return rows[0]!.n;
}

interface RejectRow {
  id: string;
  record_name: string | null;
  reason: string;
}

async function rejectsAfter(db: Database, gatewayId: string, afterId: string) {
  const { rows } = await sql<RejectRow>`
    select id::text, record_name, reason from ingest_rejects
    where gateway_id = ${gatewayId} and id > ${afterId}::bigint order by id`.execute(db);
  return rows;
}

async function packetTooLargeCount(): Promise<number> {
  const text = await (await fetch(`${ingest.httpUrl}/metrics`)).text();
  const match = /refused_connections_total\{reason="packet_too_large"\} (\d+)/.exec(text);
  return match ? Number(match[1]) : 0;
}

async function lastRejectId(db: Database): Promise<string> {
  const { rows } = await sql<{ id: string }>`
    select coalesce(max(id), 0)::text as id from ingest_rejects`.execute(db);
  return rows[0]!.id;
}

describe('the ingest bad-input corpus', () => {
  it('has at least 200 cases', () => {
    expect(PAYLOAD_CASES.length + WRONG_TOPICS.length + RAW_CASES.length).toBeGreaterThanOrEqual(
      200,
    );
  });

  const families = [...new Set(PAYLOAD_CASES.map((c) => c.family))];
  for (const family of families) {
    it(`payloads: ${family} — good records kept, every bad one refused with a reason`, async () => {
      const cases = PAYLOAD_CASES.filter((c) => c.family === family);
      const failures: string[] = [];
      let client = await connectGateway(ingest.mqttUrl, sender);
      const reports: {
        messageId?: number;
        stored: number;
        rejected?: unknown[];
        packError?: string;
      }[] = [];
      const collect = (_topic: string, message: Buffer) =>
        reports.push(JSON.parse(message.toString('utf8')) as (typeof reports)[number]);
      client.on('message', collect);
      await client.subscribeAsync(`gateways/${sender.gatewayId}/rejects`, { qos: 1 });
      try {
        for (const c of cases) {
          const index = PAYLOAD_CASES.indexOf(c);
          const problem = await runPayloadCase(c, index, client, reports);
          if (problem) failures.push(`${c.family} / ${c.what}: ${problem}`);
          if (problem?.startsWith('connection closed')) {
            client.end(true);
            client = await connectGateway(ingest.mqttUrl, sender);
            client.on('message', collect);
          }
        }
        await brokerStillServes();
      } finally {
        client.end(true);
      }
      expect(failures).toEqual([]);
    });
  }

  async function runPayloadCase(
    c: PayloadCase,
    index: number,
    client: MqttClient,
    reports: { messageId?: number; stored: number; rejected?: unknown[]; packError?: string }[],
  ): Promise<string | null> {
    const now = Math.floor(Date.now() / 1000);
    const ctx = {
      gatewayId: sender.gatewayId,
      bn: baseName(sender.gatewayId),
      t: now - (index + 1) * 3600,
      now,
    };
    const payload = c.payload(ctx);
    const readingsBefore = await readingCount(database.db, sender.siteId);
    const rejectFrom = await lastRejectId(database.db);
    const reportsBefore = reports.length;
    const outcome = await publishOrClose(client, `gateways/${sender.gatewayId}/senml`, payload);
    if (outcome === 'closed') return 'connection closed without a PUBACK';
    const stored = (await readingCount(database.db, sender.siteId)) - readingsBefore;
    const rejects = await rejectsAfter(database.db, sender.gatewayId, rejectFrom);
    const problems: string[] = [];
    for (const r of rejects) {
      // A reason a person can read: some words, no stack trace, no internals.
      if (!/^[\s\S]{10,600}$/.test(r.reason) || /\bat .+:\d+:\d+\)|Error:/.test(r.reason))
        problems.push(`unreadable reason ${JSON.stringify(r.reason.slice(0, 120))}`);
    }
    if ('packError' in c.expect) {
      if (stored !== 0) problems.push(`stored ${stored} readings of a refused pack`);
      if (rejects.length !== 1 || !c.expect.packError.test(rejects[0]!.reason)) {
        problems.push(
          `want one pack reject matching ${c.expect.packError}, got ${JSON.stringify(rejects.map((r) => r.reason.slice(0, 120)))}`,
        );
      }
    } else {
      const want = c.expect;
      if (stored !== want.stored) problems.push(`stored ${stored} readings, want ${want.stored}`);
      if (rejects.length !== want.rejects.length) {
        problems.push(
          `${rejects.length} rejects, want ${want.rejects.length}: ${JSON.stringify(rejects.slice(0, 3).map((r) => r.reason.slice(0, 120)))}`,
        );
      } else {
        want.rejects.forEach((pattern, i) => {
          if (!pattern.test(rejects[i]!.reason))
            problems.push(`reject ${i}: ${JSON.stringify(rejects[i]!.reason)} !~ ${pattern}`);
        });
      }
    }
    // The gateway is told too (on its rejects topic), whenever something was refused.
    if (rejects.length > 0) {
      const until = Date.now() + 2000;
      while (reports.length === reportsBefore && Date.now() < until)
        await new Promise((r) => setTimeout(r, 10));
      const report = reports[reports.length - 1];
      if (reports.length === reportsBefore || !report) problems.push('no rejects report published');
      else if ('packError' in c.expect ? !report.packError : report.stored !== stored)
        problems.push(`report does not match: ${JSON.stringify(report).slice(0, 200)}`);
    }
    return problems.length > 0 ? problems.join('; ') : null;
  }

  it('closes a gateway that publishes to a topic outside its own, stores nothing, serves others', async () => {
    const failures: string[] = [];
    const pack = JSON.stringify([
      { bn: baseName(raw.gatewayId), n: 'battery/voltage', u: 'V', v: 25 },
    ]);
    for (const topic of WRONG_TOPICS) {
      const name = topic(raw.gatewayId);
      const rawRejects = await lastRejectId(database.db);
      const result = await rawExchange(
        Buffer.concat([connectPacket(credentials(raw)), publishPacket(name, pack)]),
      );
      // CONNACK accepted (4 bytes), then no PUBACK: the connection is closed.
      if (!result.closed) failures.push(`${name.slice(0, 60)}: connection left open`);
      if (result.bytes.length > 4)
        failures.push(`${name.slice(0, 60)}: broker answered ${hex(result.bytes.subarray(4))}`);
      if ((await rejectsAfter(database.db, raw.gatewayId, rawRejects)).length > 0)
        failures.push(`${name.slice(0, 60)}: something was stored`);
      await brokerStillServes();
    }
    expect(failures).toEqual([]);
    expect(await readingCount(database.db, raw.siteId)).toBe(0);
  });

  it('cuts a gateway sending packs over the packet limit; it reconnects and carries on', async () => {
    const cutBefore = await packetTooLargeCount();
    const failures: string[] = [];
    for (const size of [MAX_PACKET_BYTES + 1, MAX_PACKET_BYTES * 2, 4 * 1024 * 1024]) {
      const client = await connectGateway(ingest.mqttUrl, raw);
      const rejectsFrom = await lastRejectId(database.db);
      const big = JSON.stringify([
        { bn: baseName(raw.gatewayId), n: 'controller/stage', vs: 'x'.repeat(size) },
      ]);
      const outcome = await publishOrClose(client, `gateways/${raw.gatewayId}/senml`, big);
      client.end(true);
      if (outcome !== 'closed') failures.push(`${size} bytes: ${outcome}`);
      // Nothing of it was read, so nothing is stored (not even a reject: there is no pack).
      if ((await rejectsAfter(database.db, raw.gatewayId, rejectsFrom)).length > 0)
        failures.push(`${size} bytes: a reject was stored`);
      await brokerStillServes();
    }
    expect(failures).toEqual([]);
    expect(await packetTooLargeCount()).toBe(cutBefore + 3);
    // The same gateway, sending a normal pack afterwards, is served as usual.
    const client = await connectGateway(ingest.mqttUrl, raw);
    try {
      const ok = await publishOrClose(
        client,
        `gateways/${raw.gatewayId}/senml`,
        JSON.stringify([{ bn: baseName(raw.gatewayId), n: 'battery/voltage', u: 'V', v: 24.9 }]),
      );
      expect(ok).toBe('acked');
    } finally {
      client.end(true);
    }
    expect(await readingCount(database.db, raw.siteId)).toBe(1);
  });

  it('survives malformed MQTT packets on a raw socket and keeps serving others', async () => {
    const failures: string[] = [];
    for (const c of RAW_CASES) {
      const prefix = c.authenticated ? connectPacket(credentials(raw)) : Buffer.alloc(0);
      const result = await rawExchange(Buffer.concat([prefix, c.bytes(raw)]), {
        waitForConnack: c.authenticated,
        openForMs: c.mayStayOpen ? 500 : 5000,
      });
      if (c.authenticated && !result.bytes.subarray(0, 4).equals(Buffer.from([0x20, 2, 0, 0])))
        failures.push(`${c.what}: the valid CONNECT before it was not accepted`);
      if (!c.mayStayOpen && !result.closed) failures.push(`${c.what}: connection left open`);
      const answer = result.bytes.subarray(c.authenticated ? 4 : 0);
      if (c.connackCode !== undefined) {
        if (!answer.equals(Buffer.from([0x20, 2, 0, c.connackCode])))
          failures.push(`${c.what}: want CONNACK ${c.connackCode}, got ${hex(answer)}`);
      } else if (answer.length > 0 && answer[0] === 0x20 && answer[3] === 0) {
        failures.push(`${c.what}: the broker accepted it (${hex(answer)})`);
      }
      await brokerStillServes();
    }
    expect(failures).toEqual([]);
    // Only the one good pack of the test above: no raw case stored anything.
    expect(await readingCount(database.db, raw.siteId)).toBe(1);
    const health = (await (await fetch(`${ingest.httpUrl}/health`)).json()) as {
      broker: { connectedGateways: number };
    };
    expect(health.broker.connectedGateways).toBeGreaterThanOrEqual(1);
  });
});

function credentials(g: SeededSite) {
  return { clientId: g.gatewayId, username: g.gatewayId, password: g.secret };
}

function hex(bytes: Buffer): string {
  return bytes.subarray(0, 16).toString('hex') || '(nothing)';
}

/**
 * Writes bytes on a fresh TCP connection and collects what comes back until the broker closes
 * it or `openForMs` passes. With `waitForConnack`, the first 4 bytes (a CONNACK) are awaited
 * before the rest is written, as a client would.
 */
async function rawExchange(
  bytes: Buffer,
  options: { waitForConnack?: boolean; openForMs?: number } = {},
): Promise<{ closed: boolean; bytes: Buffer }> {
  const socket: Socket = createConnection({ host: '127.0.0.1', port: mqttPort });
  const received: Buffer[] = [];
  let closed = false;
  const closedPromise = new Promise<void>((resolve) =>
    socket.once('close', () => {
      closed = true;
      resolve();
    }),
  );
  socket.on('data', (chunk) => received.push(chunk));
  socket.on('error', () => undefined);
  await new Promise<void>((resolve) => socket.once('connect', () => resolve()));
  if (options.waitForConnack) {
    // The CONNECT is at the start of `bytes`; its length is in the fixed header.
    let length = 0;
    let multiplier = 1;
    let i = 1;
    for (;;) {
      const b = bytes[i]!;
      length += (b & 0x7f) * multiplier;
      multiplier *= 128;
      i += 1;
      if ((b & 0x80) === 0) break;
    }
    socket.write(bytes.subarray(0, i + length));
    const until = Date.now() + 8000;
    while (Buffer.concat(received).length < 4 && !closed && Date.now() < until)
      await new Promise((r) => setTimeout(r, 5));
    if (!closed) socket.write(bytes.subarray(i + length));
  } else {
    socket.write(bytes);
  }
  await Promise.race([closedPromise, new Promise((r) => setTimeout(r, options.openForMs ?? 5000))]);
  const result = { closed, bytes: Buffer.concat(received) };
  socket.destroy();
  return result;
}
