/*
 * Two ingest nodes in shared mode (INGEST_BROKER_MODE=shared) behind a project-local HAProxy
 * (TCP, round-robin) with a project-local Redis, all on loopback: real processes, real MQTT.js
 * gateways, the run's throw-away PostgreSQL. A third aedes broker in this process joins the
 * same Redis the way any ingest node does, to send messages down to gateways from "another
 * node".
 */
import { Aedes, type PublishPacket } from 'aedes';
import { sql } from 'kysely';
import mqtt, { type IClientOptions, type MqttClient } from 'mqtt';
import { useTestDatabase } from '@wellkept/db/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  createSharedBrokerState,
  type SharedBrokerState,
} from '../../src/broker/shared-broker-state.js';
import { createLogger } from '../../src/logging/logger.js';
import { baseName, seedSite, waitFor, type SeededSite } from '../support/ingest-harness.js';
import {
  scratchFolder,
  startHaproxy,
  startIngestNode,
  startRedis,
  type IngestNode,
  type LocalProcess,
} from './loopback-services.js';

const test = useTestDatabase('cluster');
const scratch = scratchFolder('cluster-test');
let redis: LocalProcess & { url: string };
let nodeA: IngestNode;
let nodeB: IngestNode;
let balancer: LocalProcess;
let sender: Aedes;
let senderState: SharedBrokerState;
const clients: MqttClient[] = [];

beforeAll(async () => {
  redis = await startRedis(scratch.dir);
  const start = (name: string) =>
    startIngestNode({ name, databaseUrl: test.url, redisUrl: redis.url });
  [nodeA, nodeB] = await Promise.all([start('a'), start('b')]);
  balancer = await startHaproxy(scratch.dir, [
    { name: 'a', port: nodeA.port },
    { name: 'b', port: nodeB.port },
  ]);
  senderState = createSharedBrokerState(redis.url, createLogger('silent'));
  sender = await Aedes.createBroker({ mq: senderState.mq, persistence: senderState.persistence });
}, 90_000);

afterAll(async () => {
  for (const c of clients) c.end(true);
  await new Promise<void>((resolve) => (sender ? sender.close(() => resolve()) : resolve()));
  await senderState?.close();
  await Promise.all([nodeA?.stop(), nodeB?.stop()]);
  await balancer?.stop();
  await redis?.stop();
  scratch.remove();
}, 60_000);

const url = (port: number) => `mqtt://127.0.0.1:${port}`;

/** An MQTT.js gateway; resolves on CONNACK with whether the broker had its session. */
async function gateway(
  port: number,
  site: SeededSite,
  options: IClientOptions = {},
): Promise<{ client: MqttClient; sessionPresent: boolean }> {
  const client = mqtt.connect(url(port), {
    clientId: site.gatewayId,
    username: site.gatewayId,
    password: site.secret,
    clean: false,
    protocolVersion: 4,
    reconnectPeriod: 0,
    connectTimeout: 10_000,
    ...options,
  });
  clients.push(client);
  const sessionPresent = await new Promise<boolean>((resolve, reject) => {
    client.once('connect', (connack) => resolve(connack.sessionPresent));
    client.once('error', reject);
  });
  return { client, sessionPresent };
}

function end(client: MqttClient): Promise<void> {
  return new Promise((resolve) => client.end(false, {}, () => resolve()));
}

/** The next message on `topic` (registered before the action that causes it). */
function nextMessage(client: MqttClient, topic: string, timeoutMs = 10_000): Promise<string> {
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`no message on ${topic}`)), timeoutMs);
    const onMessage = (t: string, payload: Buffer) => {
      if (t !== topic) return;
      clearTimeout(timer);
      client.off('message', onMessage);
      resolve(payload.toString('utf8'));
    };
    client.on('message', onMessage);
  });
}

function subscribe(client: MqttClient, topic: string): Promise<void> {
  return new Promise((resolve, reject) =>
    client.subscribe(topic, { qos: 1 }, (error, granted) =>
      error || granted?.[0]?.qos === 128
        ? reject(error ?? new Error('subscription refused'))
        : resolve(),
    ),
  );
}

/** Sends a message down to a gateway from the third broker (as any other node would). */
function sendDown(topic: string, payload: string): Promise<void> {
  const packet = {
    cmd: 'publish',
    topic,
    payload: Buffer.from(payload),
    qos: 1,
    retain: false,
    dup: false,
  } as PublishPacket;
  return new Promise((resolve, reject) =>
    sender.publish(packet, (error) => (error ? reject(error) : resolve())),
  );
}

async function connectedOn(node: IngestNode): Promise<number> {
  const text = await (await fetch(`http://127.0.0.1:${node.httpPort}/metrics`)).text();
  return Number(/^wellkept_ingest_connected_gateways (\d+)/m.exec(text)?.[1] ?? NaN);
}

async function onlineInDatabase(gatewayId: string): Promise<boolean | undefined> {
  const row = await test.db
    .selectFrom('gateways')
    .select('online')
    .where('id', '=', gatewayId)
    .executeTakeFirst();
  return row?.online ?? undefined;
}

describe('two ingest nodes sharing broker state through Redis', () => {
  it('shows a retained status published on one node to a subscriber on the other', async () => {
    const site = await seedSite(test.db);
    const status = `gateways/${site.gatewayId}/status`;
    const onA = await gateway(nodeA.port, site);
    await new Promise<void>((resolve, reject) =>
      onA.client.publish(status, 'online', { qos: 1, retain: true }, (e) =>
        e ? reject(e) : resolve(),
      ),
    );
    await end(onA.client);

    const onB = await gateway(nodeB.port, site);
    const retained = nextMessage(onB.client, status);
    await subscribe(onB.client, status);
    expect(await retained).toBe('online');
    await end(onB.client);
  });

  it('delivers a message sent down to a gateway on whichever node holds it', async () => {
    const site = await seedSite(test.db);
    const down = `gateways/${site.gatewayId}/rejects`;
    for (const node of [nodeA, nodeB]) {
      const { client } = await gateway(node.port, site, { clean: true });
      await subscribe(client, down);
      const received = nextMessage(client, down);
      await sendDown(down, `to ${node.name}`);
      expect(await received).toBe(`to ${node.name}`);
      await end(client);
    }
  });

  it('keeps a session across nodes: subscriptions and messages queued while offline', async () => {
    const site = await seedSite(test.db);
    const down = `gateways/${site.gatewayId}/rejects`;
    const first = await gateway(nodeA.port, site);
    await subscribe(first.client, down);
    await end(first.client);

    await sendDown(down, 'queued while offline');
    // Reconnect on the other node without subscribing again: the session is in Redis.
    const client = mqtt.connect(url(nodeB.port), {
      clientId: site.gatewayId,
      username: site.gatewayId,
      password: site.secret,
      clean: false,
      protocolVersion: 4,
      reconnectPeriod: 0,
    });
    clients.push(client);
    const queued = nextMessage(client, down);
    const sessionPresent = await new Promise<boolean>((resolve, reject) => {
      client.once('connect', (connack) => resolve(connack.sessionPresent));
      client.once('error', reject);
    });
    expect(sessionPresent).toBe(true);
    expect(await queued).toBe('queued while offline');
    await end(client);
  });

  it('closes the first connection when the same gateway connects to the other node', async () => {
    const site = await seedSite(test.db);
    const status = `gateways/${site.gatewayId}/status`;
    const will = { topic: status, payload: Buffer.from('offline'), qos: 1 as const, retain: true };
    const first = await gateway(nodeA.port, site, { will });
    first.client.publish(status, 'online', { qos: 1, retain: true });
    await waitFor(() => onlineInDatabase(site.gatewayId), 10_000, 'online after connecting');
    const firstClosed = new Promise<void>((resolve) => first.client.once('close', resolve));

    // (No `online` from the second connection: the broker's own bookkeeping must hold.)
    const second = await gateway(nodeB.port, site, { will });
    await firstClosed;
    expect(first.client.connected).toBe(false);
    expect(second.client.connected).toBe(true);

    // The replaced connection's will must not mark the gateway offline: it is online on B.
    await new Promise((r) => setTimeout(r, 1500));
    expect(await onlineInDatabase(site.gatewayId)).toBe(true);
    const retained = nextMessage(second.client, status);
    await subscribe(second.client, status);
    expect(await retained).toBe('online');
    await end(second.client);
  });

  it('moves the gateways of a SIGKILLed node to the other node; every acknowledged record is stored once', async () => {
    const fleetSize = 8;
    const sites = [];
    for (let i = 0; i < fleetSize; i++) sites.push(await seedSite(test.db));
    const perPack = 3;
    const acked = new Map<string, number[]>();
    const sent = new Map<string, number[]>();
    const reconnected = new Set<string>();
    let publishing = true;
    let inflight = 0;

    const fleet = await Promise.all(
      sites.map(async (site) => {
        const { client } = await gateway(balancer.port, site, {
          reconnectPeriod: 200,
          reconnectOnConnackError: true,
        });
        acked.set(site.gatewayId, []);
        sent.set(site.gatewayId, []);
        // Connected already: every further CONNACK is a reconnection.
        client.on('connect', () => reconnected.add(site.gatewayId));
        let lastMs = 0;
        const timer = setInterval(() => {
          if (!publishing || !client.connected) return;
          const ms = Math.max(Date.now(), lastMs + 1);
          lastMs = ms;
          const t = ms / 1000;
          const pack = JSON.stringify([
            { bn: baseName(site.gatewayId), bt: t, n: 'battery/voltage', u: 'V', v: 25.5 },
            { n: 'battery/current', u: 'A', v: 3.1 },
            { n: 'tank/main/level', u: 'm', v: 1.2 },
          ]);
          sent.get(site.gatewayId)!.push(ms);
          inflight += 1;
          client.publish(`gateways/${site.gatewayId}/senml`, pack, { qos: 1 }, (error) => {
            inflight -= 1;
            if (!error) acked.get(site.gatewayId)!.push(ms);
          });
        }, 20);
        return { site, client, timer };
      }),
    );

    // Round-robin put gateways on both nodes.
    const before = await waitFor(
      async () => {
        const counts = { a: await connectedOn(nodeA), b: await connectedOn(nodeB) };
        return counts.a + counts.b === fleetSize && counts;
      },
      10_000,
      'every gateway counted by a node',
    );
    expect(before.a).toBeGreaterThan(0);
    expect(before.b).toBeGreaterThan(0);

    await new Promise((r) => setTimeout(r, 2000));
    const ackedBeforeKill = [...acked.values()].reduce((n, list) => n + list.length, 0);
    reconnected.clear();
    await nodeA.kill();

    // Node A's gateways reconnect through the balancer, which sends them to node B.
    await waitFor(
      async () =>
        reconnected.size >= before.a &&
        fleet.every((g) => g.client.connected) &&
        (await connectedOn(nodeB)) === fleetSize,
      30_000,
      'every gateway connected to node B',
    );
    // Only node A's gateways had to move; node B's kept their connections.
    expect(reconnected.size).toBe(before.a);
    await new Promise((r) => setTimeout(r, 2000));
    publishing = false;
    await waitFor(async () => inflight === 0, 20_000, 'every pack acknowledged');
    for (const g of fleet) clearInterval(g.timer);
    await Promise.all(fleet.map((g) => end(g.client)));

    const ackedTotal = [...acked.values()].reduce((n, list) => n + list.length, 0);
    expect(ackedTotal).toBeGreaterThan(ackedBeforeKill);
    for (const { site } of fleet) {
      const { rows } = await sql<{ ms: string; n: number }>`
        select (extract(epoch from time) * 1000)::bigint::text as ms, count(*)::int as n
        from readings where site_id = ${site.siteId} group by time`.execute(test.db);
      const stored = new Map(rows.map((r) => [Number(r.ms), r.n]));
      const sentTimes = new Set(sent.get(site.gatewayId));
      // Every acknowledged pack is there, whole, once (re-sent packs were not stored twice).
      for (const ms of acked.get(site.gatewayId)!) expect(stored.get(ms)).toBe(perPack);
      // Nothing else: only packs that were sent, each whole.
      for (const [ms, n] of stored) {
        expect(sentTimes.has(ms)).toBe(true);
        expect(n).toBe(perPack);
      }
    }
  }, 90_000);
});
