import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import {
  createPool,
  freePort,
  repoRoot,
  startThrowawayCluster,
  type DB,
  type Database,
  type PostgresCluster,
} from '@wellkept/db';
import { Kysely, PostgresDialect } from 'kysely';
import { ingestNodeArgs } from '../../ingest/src/config/node-args.js';
import { RestartableCatcher } from './restartable-catcher.js';
import { ServiceProcess } from './service-process.js';

/** Everything a fault run needs, each part a real process or server it may stop. */
export interface FaultStack {
  cluster: PostgresCluster;
  databaseUrl: string;
  /** The harness's own connection (survives the database restarting: the pool reconnects). */
  db: Database;
  catcher: RestartableCatcher;
  ingest: ServiceProcess;
  api: ServiceProcess;
  mqttUrl: string;
  apiUrl: string;
  stop(): Promise<void>;
}

export interface StackOptions {
  /** Data-folder prefix; `test` lets `npm test` sweep folders of runs that died. */
  prefix: string;
  log: (message: string) => void;
  /** Extra or overriding environment for ingest (e.g. connection limits for the load run). */
  ingestEnv?: Record<string, string>;
}

const ENTRIES = { ingest: 'ingest/dist/main.js', api: 'api/dist/main.js' };

/** Newest modification time under a folder, ms. */
function newest(dir: string): number {
  let max = 0;
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const path = join(dir, entry.name);
    max = Math.max(max, entry.isDirectory() ? newest(path) : statSync(path).mtimeMs);
  }
  return max;
}

/**
 * The services run from their build (Nest needs the decorator metadata that tsc emits and tsx
 * does not). Builds with `tsc -b` when a build is missing or older than the sources.
 */
export function ensureBuilt(log: (m: string) => void): void {
  // tsc -b rewrites a workspace's tsbuildinfo whenever it rebuilds it (outputs whose text did
  // not change keep their old times), so sources newer than it mean a build is due.
  const stale =
    Object.values(ENTRIES).some((entry) => !existsSync(join(repoRoot, entry))) ||
    ['ingest', 'api', 'db', 'core'].some((ws) => {
      const info = join(repoRoot, ws, 'tsconfig.tsbuildinfo');
      return !existsSync(info) || statSync(info).mtimeMs < newest(join(repoRoot, ws, 'src'));
    });
  if (!stale) return;
  log('building the services (tsc -b)...');
  const r = spawnSync('npx', ['tsc', '-b'], { cwd: repoRoot, stdio: 'inherit' });
  if (r.status !== 0) {
    const missing = Object.values(ENTRIES).filter((e) => !existsSync(join(repoRoot, e)));
    if (missing.length) throw new Error(`tsc -b failed and ${missing.join(', ')} is missing`);
    log('tsc -b failed; running the existing build');
  }
}

/**
 * Starts a durable throw-away PostgreSQL (fsync on: "committed" means what it means in
 * production, and an immediate stop is a real crash), the mail catcher, then ingest and the API
 * as child processes on free ports. Timers are shortened so a run takes minutes, not hours:
 * roll-up sweep 0.5 s, rules tick 0.5 s, mail retry from 0.5 s.
 */
export async function startStack(options: StackOptions): Promise<FaultStack> {
  ensureBuilt(options.log);
  const run = await startThrowawayCluster({ prefix: options.prefix, durable: true });
  const pool = createPool(run.databaseUrl, { max: 4, applicationName: 'wellkept-faults' });
  // Connections die when the fault runs stop the server; the pool opens new ones.
  pool.on('error', () => undefined);
  pool.on('connect', (client) => client.on('error', () => undefined));
  const db = new Kysely<DB>({ dialect: new PostgresDialect({ pool }) });
  const catcher = await RestartableCatcher.start();
  const [mqttPort, wsPort, ingestHttpPort, apiPort] = [
    await freePort(),
    await freePort(),
    await freePort(),
    await freePort(),
  ];
  const common = {
    PATH: process.env.PATH,
    HOME: process.env.HOME,
    DATABASE_URL: run.databaseUrl,
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: String(catcher.smtpPort),
    MAIL_FROM: 'Wellkept <alerts@wellkept.example>',
    LOG_LEVEL: 'warn',
  };
  const ingest = new ServiceProcess({
    name: 'ingest',
    args: [...ingestNodeArgs(), ENTRIES.ingest],
    env: {
      ...common,
      NODE_ENV: 'production',
      INGEST_HOST: '127.0.0.1',
      MQTT_PORT: String(mqttPort),
      MQTT_WS_PORT: String(wsPort),
      INGEST_HTTP_PORT: String(ingestHttpPort),
      INGEST_ROLLUP_INTERVAL_MS: '500',
      INGEST_LAST_SEEN_INTERVAL_MS: '500',
      RULES_TICK_MS: '500',
      RULES_DEBOUNCE_MS: '200',
      RULES_MIN_INTERVAL_MS: '1000',
      MAIL_SEND_INTERVAL_S: '0.5',
      MAIL_RETRY_FIRST_S: '0.5',
      MAIL_MAX_ATTEMPTS: '1000',
      ...options.ingestEnv,
    },
    readyUrl: `http://127.0.0.1:${ingestHttpPort}/health`,
  });
  const api = new ServiceProcess({
    name: 'api',
    args: [ENTRIES.api],
    env: {
      ...common,
      NODE_ENV: 'development',
      API_HOST: '127.0.0.1',
      API_PORT: String(apiPort),
      JWT_SECRET: 'fault-run-signing-key-0123456789abcdef',
    },
    readyUrl: `http://127.0.0.1:${apiPort}/api/docs/openapi.json`,
  });
  const stack: FaultStack = {
    cluster: run.cluster,
    databaseUrl: run.databaseUrl,
    db,
    catcher,
    ingest,
    api,
    mqttUrl: `mqtt://127.0.0.1:${mqttPort}`,
    apiUrl: `http://127.0.0.1:${apiPort}`,
    async stop() {
      await Promise.all([ingest.stop(5000), api.stop(5000)]);
      await catcher.halt();
      await db.destroy().catch(() => undefined);
      // FAULTS_KEEP_DATABASE=1 leaves the cluster running for a look afterwards.
      if (process.env.FAULTS_KEEP_DATABASE === '1') {
        options.log(`database kept: ${run.databaseUrl} (data in ${run.cluster.dataDir})`);
      } else run.destroy();
    },
  };
  try {
    await Promise.all([ingest.start(), api.start()]);
  } catch (error) {
    await stack.stop();
    throw error;
  }
  return stack;
}
