/**
 * The real ingest service, started in-process on ports the kernel picks (the same way ingest's
 * own tests start it), and a TCP relay in front of its MQTT port that a test can cut to take a
 * gateway's link down for real.
 */
import 'reflect-metadata';
import net from 'node:net';
import type { NestFastifyApplication } from '@nestjs/platform-fastify';
import { sql } from 'kysely';
import type { Database } from '@wellkept/db';
import { startIngest } from '../../../ingest/src/app.js';
import { BrokerService } from '../../../ingest/src/broker/broker.service.js';
import { readIngestConfig } from '../../../ingest/src/config/ingest-config.js';
import { createLogger } from '../../../ingest/src/logging/logger.js';

export interface RunningIngest {
  app: NestFastifyApplication;
  mqttPort: number;
  close(): Promise<void>;
}

export async function startTestIngest(databaseUrl: string): Promise<RunningIngest> {
  // Ingest's own validated settings from an environment (new settings get their defaults), with
  // every port left to the kernel and the roll-up out of the way.
  const logLevel = process.env.INGEST_TEST_LOG ?? 'silent';
  const config = readIngestConfig({
    DATABASE_URL: databaseUrl,
    INGEST_HOST: '127.0.0.1',
    MQTT_PORT: '0',
    MQTT_WS_PORT: '0',
    INGEST_HTTP_PORT: '0',
    INGEST_BATCH_WINDOW_MS: '10',
    INGEST_ROLLUP_INTERVAL_MS: '600000',
    INGEST_LAST_SEEN_INTERVAL_MS: '200',
    INGEST_DB_POOL_SIZE: '4',
    LOG_LEVEL: logLevel,
  });
  const app = await startIngest(config, createLogger(config.logLevel));
  const broker = app.get(BrokerService);
  return { app, mqttPort: broker.ports.mqtt, close: () => app.close() };
}

/** A TCP relay to a port; `cut()` drops every connection and refuses new ones until `mend()`. */
export class LinkRelay {
  private readonly server: net.Server;
  private readonly sockets = new Set<net.Socket>();
  private open = true;
  port = 0;

  constructor(private readonly targetPort: number) {
    this.server = net.createServer((client) => {
      if (!this.open) {
        client.destroy();
        return;
      }
      const upstream = net.connect(this.targetPort, '127.0.0.1');
      for (const s of [client, upstream]) {
        this.sockets.add(s);
        s.on('close', () => this.sockets.delete(s));
        s.on('error', () => s.destroy());
      }
      client.pipe(upstream).pipe(client);
      client.on('close', () => upstream.destroy());
      upstream.on('close', () => client.destroy());
    });
  }

  async listen(): Promise<void> {
    await new Promise<void>((resolve) => this.server.listen(0, '127.0.0.1', resolve));
    this.port = (this.server.address() as net.AddressInfo).port;
  }

  cut(): void {
    this.open = false;
    for (const s of this.sockets) s.destroy();
  }

  mend(): void {
    this.open = true;
  }

  async close(): Promise<void> {
    this.cut();
    await new Promise<void>((resolve) => this.server.close(() => resolve()));
  }
}

/** Readings stored for a site: (channel name, time, value), oldest first. */
export async function storedReadings(db: Database, siteId: string) {
  const { rows } = await sql<{
    name: string;
    time: Date;
    value: number | null;
    text_value: string | null;
  }>`select c.name, r.time, r.value, r.text_value
     from readings r join channels c on c.id = r.channel_id
     where r.site_id = ${siteId} order by r.time, c.name`.execute(db);
  return rows;
}

export async function waitFor<T>(
  check: () => Promise<T | null | undefined | false>,
  timeoutMs: number,
  what: string,
): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const value = await check();
    if (value) return value;
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}
