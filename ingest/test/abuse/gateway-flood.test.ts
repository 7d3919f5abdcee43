import { useTestDatabase } from '@wellkept/db/testing';
import mqtt from 'mqtt';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { GatewayRateLimiter } from '../../src/broker/gateway-rate-limits.js';
import {
  baseName,
  connectGateway,
  publishAcked,
  readingsOf,
  seedSite,
  startTestIngest,
  type RunningIngest,
  type SeededSite,
} from '../support/ingest-harness.js';

const LIMITS = {
  connectBurst: 3,
  // One a minute: no token comes back while the test runs, however slow the machine.
  connectsPerMinute: 1,
  publishBurst: 10,
  publishesPerSecond: 25,
  maxPublishDelayMs: 20_000,
};
const database = useTestDatabase('ingest_gateway_flood');
let ingest: RunningIngest;

beforeAll(async () => {
  ingest = await startTestIngest(database.url, { gatewayLimits: LIMITS });
});
afterAll(async () => {
  await ingest?.close();
});

async function metric(name: string): Promise<number> {
  const text = await (await fetch(`${ingest.httpUrl}/metrics`)).text();
  const line = text.split('\n').find((l) => l.startsWith(name));
  return line ? Number(line.split(' ').pop()) : 0;
}

const pack = (g: SeededSite, t: number, v = 25) =>
  JSON.stringify([{ bn: baseName(g.gatewayId), bt: t, n: 'battery/voltage', u: 'V', v }]);

describe('a gateway flooding publishes', () => {
  it('is held to its publish rate while a well-behaved gateway keeps getting PUBACKs; nothing is lost', async () => {
    const flooder = await seedSite(database.db);
    const neighbour = await seedSite(database.db);
    const floodClient = await connectGateway(ingest.mqttUrl, flooder);
    const goodClient = await connectGateway(ingest.mqttUrl, neighbour);
    const FLOOD = 300;
    const base = Math.floor(Date.now() / 1000) - 3600;
    try {
      const started = Date.now();
      let floodAcked = 0;
      // Every pack is written at once; the broker decides how fast they are taken.
      const flood = Promise.all(
        Array.from({ length: FLOOD }, (_, i) =>
          publishAcked(
            floodClient,
            `gateways/${flooder.gatewayId}/senml`,
            pack(flooder, base + i),
          ).then(() => {
            floodAcked += 1;
          }),
        ),
      );
      // The neighbour reports at a normal pace meanwhile; each of its packs is acknowledged.
      const neighbourAckMs: number[] = [];
      for (let i = 0; i < 5; i++) {
        const sent = Date.now();
        await publishAcked(
          goodClient,
          `gateways/${neighbour.gatewayId}/senml`,
          pack(neighbour, base + i),
        );
        neighbourAckMs.push(Date.now() - sent);
        // No more can have been taken from the flooder than its burst plus its rate allows.
        const elapsed = (Date.now() - started) / 1000;
        expect(floodAcked).toBeLessThanOrEqual(
          LIMITS.publishBurst + Math.ceil(elapsed * LIMITS.publishesPerSecond) + 1,
        );
      }
      const floodWhenNeighbourDone = floodAcked;
      expect(floodWhenNeighbourDone, 'the flooder was still being held back').toBeLessThan(FLOOD);
      await flood;
      const floodSeconds = (Date.now() - started) / 1000;
      // Figures for the report (no timing is asserted): the flooder's rate, the neighbour's wait.
      console.log(
        `flood: ${FLOOD} packs in ${floodSeconds.toFixed(1)} s (${(FLOOD / floodSeconds).toFixed(1)}/s, limit ${LIMITS.publishesPerSecond}/s after a burst of ${LIMITS.publishBurst}); ` +
          `neighbour PUBACK ms during the flood: ${neighbourAckMs.join(', ')}`,
      );
      expect(await metric('wellkept_ingest_throttled_total{kind="publish"}')).toBeGreaterThan(0);
      // Throttled, not dropped: every pack of the flooder is stored, in order, once.
      const stored = await readingsOf(database.db, flooder.siteId);
      expect(stored.length).toBe(FLOOD);
      expect((await readingsOf(database.db, neighbour.siteId)).length).toBe(5);
    } finally {
      floodClient.end(true);
      goodClient.end(true);
    }
  });
});

describe('a gateway flooding connections', () => {
  it('is refused (return code 3) past its connect burst while other gateways connect and publish', async () => {
    const looper = await seedSite(database.db);
    const other = await seedSite(database.db);
    const refusedBefore = await metric('wellkept_ingest_throttled_total{kind="connect"}');
    const codes: number[] = [];
    for (let i = 0; i < LIMITS.connectBurst + 3; i++) {
      codes.push(await connectCode(looper));
    }
    expect(codes.slice(0, LIMITS.connectBurst)).toEqual(Array(LIMITS.connectBurst).fill(0));
    expect(codes.slice(LIMITS.connectBurst)).toEqual([3, 3, 3]);
    expect(await metric('wellkept_ingest_throttled_total{kind="connect"}')).toBe(refusedBefore + 3);
    // Another gateway is not affected.
    const client = await connectGateway(ingest.mqttUrl, other);
    try {
      await publishAcked(
        client,
        `gateways/${other.gatewayId}/senml`,
        pack(other, Math.floor(Date.now() / 1000)),
      );
    } finally {
      client.end(true);
    }
    expect((await readingsOf(database.db, other.siteId)).length).toBe(1);
  });

  it('does not let someone without the secret use up a gateway’s connect allowance', async () => {
    const victim = await seedSite(database.db);
    for (let i = 0; i < 2; i++) {
      expect(await connectCode({ ...victim, secret: 'guessed-wrong' })).toBe(4);
    }
    expect(await connectCode(victim)).toBe(0);
  });
});

/** Connects and disconnects; returns the CONNACK return code (0 = accepted). */
function connectCode(g: { gatewayId: string; secret: string }): Promise<number> {
  return new Promise((resolve, reject) => {
    const client = mqtt.connect(ingest.mqttUrl, {
      clientId: g.gatewayId,
      username: g.gatewayId,
      password: g.secret,
      protocolVersion: 4,
      reconnectPeriod: 0,
      connectTimeout: 10_000,
    });
    client.once('connect', () => {
      client.end(true, () => resolve(0));
    });
    client.once('error', (error: Error & { code?: number }) => {
      client.end(true);
      if (typeof error.code === 'number') resolve(error.code);
      else reject(error);
    });
  });
}

describe('GatewayRateLimiter', () => {
  it('spaces publishes past the burst at the steady rate and refuses a hold past the maximum', () => {
    let now = 0;
    const limiter = new GatewayRateLimiter(
      { publishBurst: 2, publishesPerSecond: 10, maxPublishDelayMs: 250 },
      () => now,
    );
    expect([1, 2].map(() => limiter.reservePublish('a'))).toEqual([0, 0]);
    expect(limiter.reservePublish('a')).toBe(100);
    expect(limiter.reservePublish('a')).toBe(200);
    expect(limiter.reservePublish('a')).toBeNull(); // would wait 300 ms
    expect(limiter.reservePublish('b')).toBe(0); // other gateways have their own bucket
    now = 1000;
    expect(limiter.reservePublish('a')).toBe(0);
  });

  it('counts connections per gateway and refills at the steady rate', () => {
    let now = 0;
    const limiter = new GatewayRateLimiter({ connectBurst: 2, connectsPerMinute: 6 }, () => now);
    limiter.takeConnect('a');
    limiter.takeConnect('a');
    expect(limiter.connectWaitMs('a')).toBe(10_000);
    expect(limiter.connectWaitMs('b')).toBe(0);
    now = 10_000;
    expect(limiter.connectWaitMs('a')).toBe(0);
  });
});
