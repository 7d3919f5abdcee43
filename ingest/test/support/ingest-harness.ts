import 'reflect-metadata';
import type { NestFastifyApplication } from '@nestjs/platform-fastify';
import { hashGatewaySecret, newGatewaySecret, type Database } from '@wellkept/db';
import mqtt, { type IClientOptions, type MqttClient } from 'mqtt';
import { sql } from 'kysely';
import { startIngest } from '../../src/app.js';
import { BrokerService } from '../../src/broker/broker.service.js';
import type { IngestConfig } from '../../src/config/ingest-config.js';
import { createLogger } from '../../src/logging/logger.js';
import { RollupService } from '../../src/storage/rollup.service.js';

/** Settings for a test instance: every port chosen by the kernel, the roll-up driven by hand. */
export function testConfig(
  databaseUrl: string,
  overrides: Partial<IngestConfig> = {},
): IngestConfig {
  return {
    databaseUrl,
    host: '127.0.0.1',
    mqttPort: 0,
    mqttWsPort: 0,
    httpPort: 0,
    tls: null,
    maxConnections: 1000,
    maxPacketBytes: 64 * 1024,
    batchWindowMs: 10,
    batchMaxRecords: 5000,
    queueMaxRecords: 50_000,
    commitConcurrency: 2,
    rawRetentionDays: 90,
    minuteRetentionDays: 400,
    rollupIntervalMs: 600_000,
    lastSeenIntervalMs: 200,
    dbPoolSize: 4,
    broker: { mode: 'single' },
    logLevel: process.env.INGEST_TEST_LOG ?? 'silent',
    ...overrides,
  };
}

export interface RunningIngest {
  app: NestFastifyApplication;
  mqttUrl: string;
  wsUrl: string;
  httpUrl: string;
  sweep(): ReturnType<RollupService['sweep']>;
  close(): Promise<void>;
}

export async function startTestIngest(
  databaseUrl: string,
  overrides: Partial<IngestConfig> = {},
): Promise<RunningIngest> {
  const config = testConfig(databaseUrl, overrides);
  const app = await startIngest(config, createLogger(config.logLevel));
  const broker = app.get(BrokerService);
  const rollup = app.get(RollupService);
  const address = app.getHttpServer().address();
  const httpPort = typeof address === 'object' && address ? address.port : 0;
  return {
    app,
    mqttUrl: `mqtt://127.0.0.1:${broker.ports.mqtt}`,
    wsUrl: `ws://127.0.0.1:${broker.ports.ws}/mqtt`,
    httpUrl: `http://127.0.0.1:${httpPort}`,
    sweep: () => rollup.sweep(),
    close: () => app.close(),
  };
}

export interface SeededSite {
  siteId: string;
  gatewayId: string;
  secret: string;
  pumpId: string;
}

let seedCounter = 0;

/**
 * A company with one site (24 V bank, a well pump filling a 2 m × 2 m upright tank) and one
 * gateway whose secret is returned.
 */
export async function seedSite(
  db: Database,
  options: { timeZone?: string } = {},
): Promise<SeededSite> {
  seedCounter += 1;
  const tag = `${process.pid}-${seedCounter}-${Math.random().toString(36).slice(2, 6)}`;
  const company = await db
    .insertInto('companies')
    .values({ name: `Test installer ${tag}` })
    .returning('id')
    .executeTakeFirstOrThrow();
  const site = await db
    .insertInto('sites')
    .values({
      company_id: company.id,
      name: `Test site ${tag}`,
      latitude: -25.5,
      longitude: 131.0,
      time_zone: options.timeZone ?? 'UTC',
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  await db
    .insertInto('battery_banks')
    .values({ site_id: site.id, chemistry: 'agm', nominal_voltage_v: 24, capacity_ah: 400 })
    .execute();
  const tank = await db
    .insertInto('tanks')
    .values({
      site_id: site.id,
      key: 'main',
      name: 'Main tank',
      kind: 'storage',
      geometry: 'vertical_cylinder',
      diameter_m: 2,
      height_m: 2,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  const pump = await db
    .insertInto('pumps')
    .values({
      site_id: site.id,
      key: 'well',
      name: 'Well pump',
      kind: 'well',
      supply: 'battery',
      rated_current_a: 8,
      fills_tank_id: tank.id,
    })
    .returning('id')
    .executeTakeFirstOrThrow();
  const secret = newGatewaySecret();
  const gatewayId = `gw-${tag}`.toLowerCase().replace(/[^a-z0-9-]/g, '-');
  await db
    .insertInto('gateways')
    .values({ id: gatewayId, site_id: site.id, secret_hash: hashGatewaySecret(secret) })
    .execute();
  return { siteId: site.id, gatewayId, secret, pumpId: pump.id };
}

/** Connects an MQTT.js gateway with the contract's settings; resolves on CONNACK. */
export async function connectGateway(
  url: string,
  gateway: { gatewayId: string; secret: string },
  options: IClientOptions = {},
): Promise<MqttClient> {
  const client = mqtt.connect(url, {
    clientId: gateway.gatewayId,
    username: gateway.gatewayId,
    password: gateway.secret,
    clean: false,
    protocolVersion: 4,
    reconnectPeriod: 0,
    connectTimeout: 5000,
    ...options,
  });
  await new Promise<void>((resolve, reject) => {
    client.once('connect', () => resolve());
    client.once('error', reject);
    client.once('close', () => reject(new Error('connection closed before CONNACK')));
  });
  return client;
}

/** Publishes at QoS 1 and resolves when the PUBACK arrives. */
export function publishAcked(client: MqttClient, topic: string, payload: string): Promise<void> {
  return new Promise((resolve, reject) => {
    client.publish(topic, payload, { qos: 1 }, (error) => (error ? reject(error) : resolve()));
  });
}

export function baseName(gatewayId: string): string {
  return `urn:dev:wellkept:${gatewayId}:`;
}

/** Readings of a site joined to channel names, oldest first. */
export async function readingsOf(db: Database, siteId: string) {
  const { rows } = await sql<{
    name: string;
    time: Date;
    value: number | null;
    text_value: string | null;
  }>`
    select c.name, r.time, r.value, r.text_value
    from readings r join channels c on c.id = r.channel_id
    where r.site_id = ${siteId} order by r.time, c.name`.execute(db);
  return rows;
}

export async function waitFor<T>(
  check: () => Promise<T | undefined | null | false>,
  timeoutMs = 10_000,
  what = 'condition',
): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const value = await check();
    if (value) return value;
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}
