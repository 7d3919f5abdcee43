import { readFileSync } from 'node:fs';
import { readDatabaseConfig } from '@wellkept/db';
import { z } from 'zod';
import {
  DEFAULT_GATEWAY_RATE_LIMITS,
  type GatewayRateLimitSettings,
} from '../broker/gateway-rate-limits.js';

const port = z.coerce.number().int().min(0).max(65535);
const positiveInt = z.coerce.number().int().positive();

/** Environment variables the ingest service reads (all optional; defaults suit `npm start`). */
const ingestEnv = z
  .object({
    MQTT_PORT: port.default(1883),
    MQTT_WS_PORT: port.default(8083),
    INGEST_HTTP_PORT: port.default(3001),
    /** Address the MQTT and HTTP listeners bind to. */
    INGEST_HOST: z.string().min(1).default('0.0.0.0'),
    /** TLS for MQTT and MQTT over WebSocket (production): PEM files. Both or neither. */
    MQTT_TLS_CERT_FILE: z.string().min(1).optional(),
    MQTT_TLS_KEY_FILE: z.string().min(1).optional(),
    MQTT_MAX_CONNECTIONS: positiveInt.default(20_000),
    MQTT_MAX_PACKET_BYTES: z.coerce
      .number()
      .int()
      .min(1024)
      .max(16 * 1024 * 1024)
      .default(256 * 1024),
    /** Group commit: how long the first pack of a batch may wait for others, milliseconds. */
    INGEST_BATCH_WINDOW_MS: z.coerce.number().int().min(0).max(5000).default(20),
    /** Group commit: most records in one database transaction. */
    INGEST_BATCH_MAX_RECORDS: positiveInt.default(20_000),
    /** Group-commit transactions that may run at once (answers still go out in order). */
    INGEST_COMMIT_CONCURRENCY: z.coerce.number().int().min(1).max(8).default(2),
    /** Most records waiting for a commit; past it new packs are refused (the client re-sends). */
    INGEST_QUEUE_MAX_RECORDS: positiveInt.default(200_000),
    /** Raw readings are kept this many days, then dropped by whole partitions. */
    INGEST_RAW_RETENTION_DAYS: z.coerce.number().int().min(31).max(3650).default(90),
    /**
     * Minute buckets are kept this many days, then dropped by whole months; charts of older
     * days read the ten-minute buckets, which are kept with the hour and day buckets.
     */
    INGEST_MINUTE_RETENTION_DAYS: z.coerce.number().int().min(31).max(36_500).default(400),
    /** How often the bucket and pump-run sweep runs, milliseconds. */
    INGEST_ROLLUP_INTERVAL_MS: z.coerce.number().int().min(100).max(600_000).default(10_000),
    /** How often gateway last-seen times and channel last values are written, milliseconds. */
    INGEST_LAST_SEEN_INTERVAL_MS: z.coerce.number().int().min(100).max(600_000).default(5_000),
    INGEST_DB_POOL_SIZE: z.coerce.number().int().min(2).max(100).default(6),
    /** Per-gateway limits (see gateway-rate-limits.ts for what each means). */
    MQTT_GATEWAY_CONNECT_BURST: positiveInt.default(DEFAULT_GATEWAY_RATE_LIMITS.connectBurst),
    MQTT_GATEWAY_CONNECTS_PER_MINUTE: z.coerce
      .number()
      .positive()
      .default(DEFAULT_GATEWAY_RATE_LIMITS.connectsPerMinute),
    MQTT_GATEWAY_PUBLISH_BURST: positiveInt.default(DEFAULT_GATEWAY_RATE_LIMITS.publishBurst),
    MQTT_GATEWAY_PUBLISHES_PER_SECOND: z.coerce
      .number()
      .positive()
      .default(DEFAULT_GATEWAY_RATE_LIMITS.publishesPerSecond),
    MQTT_GATEWAY_MAX_PUBLISH_DELAY_MS: z.coerce
      .number()
      .int()
      .min(0)
      .max(600_000)
      .default(DEFAULT_GATEWAY_RATE_LIMITS.maxPublishDelayMs),
    /**
     * `single` (default): the broker keeps sessions, retained messages and subscriptions in this
     * process. `shared`: several ingest nodes behind a TCP balancer share them through Redis
     * (docs/running-at-scale.md).
     */
    INGEST_BROKER_MODE: z.enum(['single', 'shared']).default('single'),
    /** Redis for the shared mode, e.g. redis://127.0.0.1:6379/0 (a password goes in the URL). */
    REDIS_URL: z
      .string()
      .regex(/^rediss?:\/\/[^\s]+$/, 'must be a redis:// or rediss:// URL')
      .optional(),
    LOG_LEVEL: z
      .enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent'])
      .default('info'),
  })
  .refine((e) => Boolean(e.MQTT_TLS_CERT_FILE) === Boolean(e.MQTT_TLS_KEY_FILE), {
    message: 'set both MQTT_TLS_CERT_FILE and MQTT_TLS_KEY_FILE, or neither',
    path: ['MQTT_TLS_CERT_FILE'],
  })
  .refine((e) => e.INGEST_BROKER_MODE === 'single' || Boolean(e.REDIS_URL), {
    message: 'INGEST_BROKER_MODE=shared needs REDIS_URL (the Redis that the ingest nodes share)',
    path: ['REDIS_URL'],
  })
  .refine((e) => e.INGEST_QUEUE_MAX_RECORDS >= e.INGEST_BATCH_MAX_RECORDS, {
    message: 'INGEST_QUEUE_MAX_RECORDS must be at least INGEST_BATCH_MAX_RECORDS',
    path: ['INGEST_QUEUE_MAX_RECORDS'],
  })
  // Late raw rows recompute their minutes, and those their hours: the minutes must outlive them.
  .refine((e) => e.INGEST_MINUTE_RETENTION_DAYS >= e.INGEST_RAW_RETENTION_DAYS, {
    message: 'INGEST_MINUTE_RETENTION_DAYS must be at least INGEST_RAW_RETENTION_DAYS',
    path: ['INGEST_MINUTE_RETENTION_DAYS'],
  });

/** The validated, typed settings of one ingest process. */
export interface IngestConfig {
  databaseUrl: string;
  host: string;
  mqttPort: number;
  mqttWsPort: number;
  httpPort: number;
  /** PEM certificate and key when MQTT runs over TLS. */
  tls: { cert: Buffer; key: Buffer } | null;
  maxConnections: number;
  maxPacketBytes: number;
  batchWindowMs: number;
  batchMaxRecords: number;
  queueMaxRecords: number;
  commitConcurrency: number;
  rawRetentionDays: number;
  minuteRetentionDays: number;
  rollupIntervalMs: number;
  lastSeenIntervalMs: number;
  dbPoolSize: number;
  /** Where broker state lives: this process only, or Redis shared by several ingest nodes. */
  broker: { mode: 'single' } | { mode: 'shared'; redisUrl: string };
  logLevel: string;
  /** Per-gateway connect and publish limits; defaults when absent. */
  gatewayLimits?: Partial<GatewayRateLimitSettings>;
}

/**
 * Reads and validates the settings once at start-up; a bad value stops the service with a
 * message that names the variable and what is wrong with it.
 */
export function readIngestConfig(env: NodeJS.ProcessEnv = process.env): IngestConfig {
  const parsed = ingestEnv.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`);
    throw new Error(`Invalid ingest settings in the environment:\n${lines.join('\n')}`);
  }
  const e = parsed.data;
  let tls: IngestConfig['tls'] = null;
  if (e.MQTT_TLS_CERT_FILE && e.MQTT_TLS_KEY_FILE) {
    try {
      tls = { cert: readFileSync(e.MQTT_TLS_CERT_FILE), key: readFileSync(e.MQTT_TLS_KEY_FILE) };
    } catch (error) {
      throw new Error(`Cannot read the MQTT TLS certificate or key: ${(error as Error).message}`);
    }
  }
  return {
    databaseUrl: readDatabaseConfig(env).url,
    host: e.INGEST_HOST,
    mqttPort: e.MQTT_PORT,
    mqttWsPort: e.MQTT_WS_PORT,
    httpPort: e.INGEST_HTTP_PORT,
    tls,
    maxConnections: e.MQTT_MAX_CONNECTIONS,
    maxPacketBytes: e.MQTT_MAX_PACKET_BYTES,
    batchWindowMs: e.INGEST_BATCH_WINDOW_MS,
    batchMaxRecords: e.INGEST_BATCH_MAX_RECORDS,
    queueMaxRecords: e.INGEST_QUEUE_MAX_RECORDS,
    commitConcurrency: e.INGEST_COMMIT_CONCURRENCY,
    rawRetentionDays: e.INGEST_RAW_RETENTION_DAYS,
    minuteRetentionDays: e.INGEST_MINUTE_RETENTION_DAYS,
    rollupIntervalMs: e.INGEST_ROLLUP_INTERVAL_MS,
    lastSeenIntervalMs: e.INGEST_LAST_SEEN_INTERVAL_MS,
    dbPoolSize: e.INGEST_DB_POOL_SIZE,
    broker:
      e.INGEST_BROKER_MODE === 'shared'
        ? { mode: 'shared', redisUrl: e.REDIS_URL! }
        : { mode: 'single' },
    logLevel: e.LOG_LEVEL,
    gatewayLimits: {
      connectBurst: e.MQTT_GATEWAY_CONNECT_BURST,
      connectsPerMinute: e.MQTT_GATEWAY_CONNECTS_PER_MINUTE,
      publishBurst: e.MQTT_GATEWAY_PUBLISH_BURST,
      publishesPerSecond: e.MQTT_GATEWAY_PUBLISHES_PER_SECOND,
      maxPublishDelayMs: e.MQTT_GATEWAY_MAX_PUBLISH_DELAY_MS,
    },
  };
}

/** Injection token for {@link IngestConfig}. */
export const INGEST_CONFIG = Symbol('INGEST_CONFIG');
