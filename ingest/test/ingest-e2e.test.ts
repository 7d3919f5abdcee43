import { useTestDatabase } from '@wellkept/db/testing';
import type { MqttClient } from 'mqtt';
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

const database = useTestDatabase('ingest_e2e');
let ingest: RunningIngest;
let site: SeededSite;
let client: MqttClient;

beforeAll(async () => {
  ingest = await startTestIngest(database.url);
  site = await seedSite(database.db);
  client = await connectGateway(ingest.mqttUrl, site);
});

afterAll(async () => {
  client?.end(true);
  await ingest?.close();
});

describe('an MQTT.js gateway end to end', () => {
  it('stores a QoS 1 pack before its PUBACK arrives', async () => {
    const t = Math.floor(Date.now() / 1000) - 2;
    const pack = [
      { bn: baseName(site.gatewayId), bt: t, n: 'battery/voltage', u: 'V', v: 26.4 },
      { n: 'battery/current', u: 'A', v: -3.5 },
      { n: 'pump/well/running', vb: true },
      { n: 'pump/well/current', u: 'A', v: 6.2 },
      { n: 'tank/main/level', u: 'm', v: 1.25 },
      { n: 'controller/stage', vs: 'bulk' },
    ];
    await publishAcked(client, `gateways/${site.gatewayId}/senml`, JSON.stringify(pack));
    // No waiting: the PUBACK means the rows are committed.
    const rows = await readingsOf(database.db, site.siteId);
    expect(rows.map((r) => [r.name, r.value, r.text_value])).toEqual([
      ['battery/current', -3.5, null],
      ['battery/voltage', 26.4, null],
      ['controller/stage', null, 'bulk'],
      ['pump/well/current', 6.2, null],
      ['pump/well/running', 1, null],
      ['tank/main/level', 1.25, null],
    ]);
    expect(rows.every((r) => r.time.getTime() === t * 1000)).toBe(true);
  });

  it('stores a re-sent pack once and counts the duplicates', async () => {
    const t = Math.floor(Date.now() / 1000) - 1;
    const pack = JSON.stringify([
      { bn: baseName(site.gatewayId), bt: t, n: 'battery/voltage', u: 'V', v: 25.9 },
      { n: 'battery/current', u: 'A', v: 1.5 },
    ]);
    const before = (await readingsOf(database.db, site.siteId)).length;
    await publishAcked(client, `gateways/${site.gatewayId}/senml`, pack);
    await publishAcked(client, `gateways/${site.gatewayId}/senml`, pack);
    expect((await readingsOf(database.db, site.siteId)).length).toBe(before + 2);
    const metrics = await (await fetch(`${ingest.httpUrl}/metrics`)).text();
    expect(metrics).toMatch(/wellkept_ingest_records_total\{outcome="duplicate"\} 2\b/);
  });

  it('keeps the good records of a partly bad pack and reports the bad ones', async () => {
    const reports: unknown[] = [];
    client.on('message', (topic, payload) => {
      if (topic === `gateways/${site.gatewayId}/rejects`)
        reports.push(JSON.parse(payload.toString()));
    });
    await new Promise<void>((resolve, reject) =>
      client.subscribe(`gateways/${site.gatewayId}/rejects`, { qos: 1 }, (e) =>
        e ? reject(e) : resolve(),
      ),
    );
    const t = Math.floor(Date.now() / 1000);
    const pack = [
      { bn: baseName(site.gatewayId), bt: t, n: 'battery/voltage', u: 'V', v: 912 },
      { n: 'tank/main/level', u: 'm', v: 1.31 },
      { n: 'battery/temperature', u: 'Cel', v: 22, t: 86_400 * 365 * 5 },
    ];
    await publishAcked(client, `gateways/${site.gatewayId}/senml`, JSON.stringify(pack));
    const rows = await readingsOf(database.db, site.siteId);
    expect(rows.filter((r) => r.time.getTime() === t * 1000).map((r) => r.name)).toEqual([
      'tank/main/level',
    ]);
    const rejects = await database.db
      .selectFrom('ingest_rejects')
      .selectAll()
      .where('gateway_id', '=', site.gatewayId)
      .orderBy('id')
      .execute();
    expect(rejects.map((r) => r.reason)).toEqual([
      'battery/voltage: value 912 V outside 0–40 V for a 24 V bank',
      expect.stringMatching(/^battery\/temperature: time .* is more than 5 minutes in the future$/),
    ]);
    expect(rejects[0]!.site_id).toBe(site.siteId);
    expect(rejects[0]!.raw).toContain('912');
    const report = await waitFor(async () => reports[0], 5000, 'rejects report');
    expect(report).toMatchObject({
      records: 3,
      stored: 1,
      rejected: [
        { index: 0, name: 'battery/voltage' },
        { index: 2, name: 'battery/temperature' },
      ],
    });
  });

  it('rejects a pack that is not JSON as a whole, with a reason', async () => {
    await publishAcked(client, `gateways/${site.gatewayId}/senml`, '{"not": "closed"');
    const reject = await database.db
      .selectFrom('ingest_rejects')
      .selectAll()
      .where('gateway_id', '=', site.gatewayId)
      .orderBy('id', 'desc')
      .executeTakeFirstOrThrow();
    expect(reject.reason).toMatch(/not valid JSON/);
    expect(reject.record_name).toBeNull();
    expect(reject.raw).toBe('{"not": "closed"');
  });

  it('records the gateway online from its status message and last seen from packs', async () => {
    await publishAcked(client, `gateways/${site.gatewayId}/status`, 'online');
    const gateway = await waitFor(
      async () => {
        const g = await database.db
          .selectFrom('gateways')
          .selectAll()
          .where('id', '=', site.gatewayId)
          .executeTakeFirstOrThrow();
        return g.online && g.last_seen_at ? g : null;
      },
      5000,
      'gateway online',
    );
    expect(gateway.status_changed_at).not.toBeNull();
  });

  it('answers /health and /metrics', async () => {
    const health = await fetch(`${ingest.httpUrl}/health`);
    expect(health.status).toBe(200);
    expect(await health.json()).toMatchObject({
      status: 'ok',
      database: { ok: true },
      broker: { ok: true, connectedGateways: 1 },
    });
    const metrics = await (await fetch(`${ingest.httpUrl}/metrics`)).text();
    expect(metrics).toMatch(/wellkept_ingest_connected_gateways 1\b/);
    expect(metrics).toMatch(/wellkept_ingest_commit_seconds_count [1-9]/);
    expect(metrics).toMatch(/wellkept_ingest_rejects_total\{reason="range"\} 1\b/);
  });

  it('sends NOTIFY site_updates after a commit', async () => {
    const { Client } = (await import('pg')).default;
    const listener = new Client({ connectionString: database.url });
    await listener.connect();
    try {
      const notes: string[] = [];
      listener.on('notification', (n) => notes.push(n.payload ?? ''));
      await listener.query('listen site_updates');
      const t = Math.floor(Date.now() / 1000);
      await publishAcked(
        client,
        `gateways/${site.gatewayId}/senml`,
        JSON.stringify([
          { bn: baseName(site.gatewayId), bt: t, n: 'battery/voltage', u: 'V', v: 26 },
        ]),
      );
      const note = await waitFor(async () => notes[0], 5000, 'notification');
      expect(JSON.parse(note)).toEqual({
        siteId: site.siteId,
        what: ['readings'],
        at: expect.any(String),
      });
    } finally {
      await listener.end();
    }
  });

  it('stores packs sent over MQTT over WebSocket', async () => {
    const other = await seedSite(database.db);
    const ws = await connectGateway(ingest.wsUrl, other);
    try {
      await publishAcked(
        ws,
        `gateways/${other.gatewayId}/senml`,
        JSON.stringify([{ bn: baseName(other.gatewayId), n: 'battery/voltage', u: 'V', v: 25.5 }]),
      );
      const rows = await readingsOf(database.db, other.siteId);
      expect(rows.map((r) => r.value)).toEqual([25.5]);
    } finally {
      ws.end(true);
    }
  });

  it('stops gracefully with gateways still connected: queued packs are committed first', async () => {
    const other = await startTestIngest(database.url);
    const gateway = await seedSite(database.db);
    const connected = await connectGateway(other.mqttUrl, gateway);
    const closed = new Promise<void>((resolve) => connected.once('close', () => resolve()));
    const acked = publishAcked(
      connected,
      `gateways/${gateway.gatewayId}/senml`,
      JSON.stringify([{ bn: baseName(gateway.gatewayId), n: 'battery/voltage', u: 'V', v: 24.9 }]),
    );
    await acked;
    await other.close();
    await closed;
    connected.end(true);
    expect((await readingsOf(database.db, gateway.siteId)).map((r) => r.value)).toEqual([24.9]);
  });
});
