import { createConnection } from 'node:net';
import { useTestDatabase } from '@wellkept/db/testing';
import mqtt from 'mqtt';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  baseName,
  connectGateway,
  publishAcked,
  readingsOf,
  seedSite,
  startTestIngest,
  waitFor,
  type RunningIngest,
  type SeededSite,
} from './support/ingest-harness.js';

const database = useTestDatabase('ingest_refusals');
let ingest: RunningIngest;
let site: SeededSite;
let other: SeededSite;

beforeAll(async () => {
  ingest = await startTestIngest(database.url, { maxPacketBytes: 4096, maxConnections: 20 });
  site = await seedSite(database.db);
  other = await seedSite(database.db);
});

afterAll(async () => {
  await ingest?.close();
});

/** Connects and reports how the broker answered: a CONNACK return code, or a cut connection. */
function tryConnect(options: mqtt.IClientOptions): Promise<{ code: number | 'closed' }> {
  return new Promise((resolve) => {
    const client = mqtt.connect(ingest.mqttUrl, {
      reconnectPeriod: 0,
      connectTimeout: 8000,
      protocolVersion: 4,
      ...options,
    });
    client.once('connect', () => {
      client.end(true);
      resolve({ code: 0 });
    });
    client.once('error', (error: Error & { code?: number }) => {
      client.end(true);
      resolve({ code: typeof error.code === 'number' ? error.code : 'closed' });
    });
    client.once('close', () => resolve({ code: 'closed' }));
  });
}

describe('connections the broker refuses', () => {
  it('refuses a wrong secret, an unknown gateway and a revoked one (return code 4)', async () => {
    expect(
      await tryConnect({ clientId: site.gatewayId, username: site.gatewayId, password: 'not-it' }),
    ).toEqual({ code: 4 });
    expect(
      await tryConnect({ clientId: 'gw-nobody', username: 'gw-nobody', password: site.secret }),
    ).toEqual({ code: 4 });
    const revoked = await seedSite(database.db);
    await database.db
      .updateTable('gateways')
      .set({ revoked_at: new Date() })
      .where('id', '=', revoked.gatewayId)
      .execute();
    expect(
      await tryConnect({
        clientId: revoked.gatewayId,
        username: revoked.gatewayId,
        password: revoked.secret,
      }),
    ).toEqual({ code: 4 });
  });

  it('slows answers for a gateway id after failures', async () => {
    const started = Date.now();
    expect(
      await tryConnect({ clientId: other.gatewayId, username: other.gatewayId, password: 'x' }),
    ).toEqual({ code: 4 });
    const first = Date.now() - started;
    const again = Date.now();
    expect(
      await tryConnect({ clientId: other.gatewayId, username: other.gatewayId, password: 'y' }),
    ).toEqual({ code: 4 });
    // The second failure waits for the first one's delay and its own.
    expect(Date.now() - again).toBeGreaterThan(first + 400);
    // The right secret still gets in (after the delay for this id).
    expect(
      await tryConnect({
        clientId: other.gatewayId,
        username: other.gatewayId,
        password: other.secret,
      }),
    ).toEqual({ code: 0 });
  });

  it('refuses a client id that differs from the user name (return code 2)', async () => {
    expect(
      await tryConnect({
        clientId: 'someone-else',
        username: site.gatewayId,
        password: site.secret,
      }),
    ).toEqual({ code: 2 });
  });

  it('refuses an empty client id with clean session off (MQTT-3.1.3-8, return code 2)', async () => {
    // MQTT.js (and mqtt-packet) will not build this CONNECT, so write its bytes by hand.
    const connect = connectPacket('', site.gatewayId, site.secret);
    const socket = createConnection({
      host: '127.0.0.1',
      port: Number(new URL(ingest.mqttUrl).port),
    });
    const received: Buffer[] = [];
    socket.on('data', (chunk) => received.push(chunk));
    await new Promise<void>((resolve) => socket.once('connect', () => resolve()));
    socket.write(connect);
    await new Promise<void>((resolve) => socket.once('close', () => resolve()));
    // CONNACK: type 0x20, length 2, session present 0, return code 2 (identifier rejected).
    expect([...Buffer.concat(received)]).toEqual([0x20, 0x02, 0x00, 0x02]);
  });

  it("closes the connection of a gateway publishing to another gateway's topic and stores nothing", async () => {
    const client = await connectGateway(ingest.mqttUrl, site);
    const closed = new Promise<void>((resolve) => client.once('close', () => resolve()));
    client.publish(
      `gateways/${other.gatewayId}/senml`,
      JSON.stringify([{ bn: baseName(other.gatewayId), n: 'battery/voltage', u: 'V', v: 25 }]),
      { qos: 1 },
    );
    await closed;
    client.end(true);
    expect(await readingsOf(database.db, other.siteId)).toEqual([]);
    expect(await readingsOf(database.db, site.siteId)).toEqual([]);
  });

  it("refuses a subscription to another gateway's topics", async () => {
    const client = await connectGateway(ingest.mqttUrl, site);
    const subscribe = (topic: string) =>
      new Promise<number[]>((resolve) =>
        client.subscribe(topic, { qos: 1 }, (error, grants) => {
          const packet = (error as (Error & { packet?: { granted?: number[] } }) | null)?.packet;
          resolve(packet?.granted ?? (grants ?? []).map((g) => g.qos));
        }),
      );
    try {
      expect(await subscribe(`gateways/${other.gatewayId}/#`)).toEqual([128]);
      expect(await subscribe('gateways/+/rejects')).toEqual([128]);
      expect(await subscribe(`gateways/${site.gatewayId}/#`)).toEqual([1]);
    } finally {
      client.end(true);
    }
  });

  it('cuts a connection that sends a packet over the size limit', async () => {
    const client = await connectGateway(ingest.mqttUrl, site);
    const closed = new Promise<void>((resolve) => client.once('close', () => resolve()));
    const big = JSON.stringify([
      { bn: baseName(site.gatewayId), n: 'controller/stage', vs: 'x'.repeat(8000) },
    ]);
    client.publish(`gateways/${site.gatewayId}/senml`, big, { qos: 1 });
    await closed;
    client.end(true);
    expect(await readingsOf(database.db, site.siteId)).toEqual([]);
    const metrics = await (await fetch(`${ingest.httpUrl}/metrics`)).text();
    expect(metrics).toMatch(/refused_connections_total\{reason="packet_too_large"\} 1\b/);
  });

  it('cuts a declared oversize packet as soon as its header arrives', async () => {
    const socket = createConnection({
      host: '127.0.0.1',
      port: Number(new URL(ingest.mqttUrl).port),
    });
    await new Promise<void>((resolve) => socket.once('connect', () => resolve()));
    const closed = new Promise<void>((resolve) => socket.once('close', () => resolve()));
    // A CONNECT header declaring 200 MB (remaining length 0xC0 0x84 0xBD 0x5F), then nothing.
    socket.write(Buffer.from([0x10, 0x80, 0x80, 0x80, 0x60]));
    await closed;
    expect(socket.destroyed).toBe(true);
  });

  it('refuses connections beyond the configured maximum', async () => {
    const sockets = Array.from({ length: 25 }, () =>
      createConnection({ host: '127.0.0.1', port: Number(new URL(ingest.mqttUrl).port) }),
    );
    try {
      const states = await Promise.all(
        sockets.map(
          (s) =>
            new Promise<string>((resolve) => {
              s.once('close', () => resolve('closed'));
              setTimeout(() => resolve('open'), 1500);
            }),
        ),
      );
      expect(states.filter((s) => s === 'open').length).toBe(20);
      expect(states.filter((s) => s === 'closed').length).toBe(5);
    } finally {
      for (const s of sockets) s.destroy();
    }
  });

  it('replaces the first connection when a second one uses the same id', async () => {
    await waitFor(async () => {
      const health = (await (await fetch(`${ingest.httpUrl}/health`)).json()) as {
        broker: { connectedGateways: number };
      };
      return health.broker.connectedGateways === 0;
    });
    const first = await connectGateway(ingest.mqttUrl, site);
    const firstClosed = new Promise<void>((resolve) => first.once('close', () => resolve()));
    const second = await connectGateway(ingest.mqttUrl, site);
    await firstClosed;
    first.end(true);
    try {
      await publishAcked(
        second,
        `gateways/${site.gatewayId}/senml`,
        JSON.stringify([{ bn: baseName(site.gatewayId), n: 'battery/voltage', u: 'V', v: 25.2 }]),
      );
      expect((await readingsOf(database.db, site.siteId)).map((r) => r.value)).toEqual([25.2]);
    } finally {
      second.end(true);
    }
  });
});

/** An MQTT 3.1.1 CONNECT with clean session off, user name and password (§3.1). */
function connectPacket(clientId: string, username: string, password: string): Buffer {
  const field = (text: string) => {
    const bytes = Buffer.from(text, 'utf8');
    const length = Buffer.alloc(2);
    length.writeUInt16BE(bytes.length);
    return Buffer.concat([length, bytes]);
  };
  const body = Buffer.concat([
    field('MQTT'),
    Buffer.from([0x04, 0xc0, 0x00, 0x1e]), // level 4; user name + password flags; keep-alive 30 s
    field(clientId),
    field(username),
    field(password),
  ]);
  const length: number[] = [];
  let n = body.length;
  do {
    let byte = n % 128;
    n = Math.floor(n / 128);
    if (n > 0) byte |= 0x80;
    length.push(byte);
  } while (n > 0);
  return Buffer.concat([Buffer.from([0x10, ...length]), body]);
}
