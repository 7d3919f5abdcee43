/**
 * `npm start`: installs what is missing, builds, starts the project-local PostgreSQL,
 * migrates, loads the demo scenario on first run, then starts every service that exists with
 * its output prefixed by its name. Ctrl-C stops everything (services first, then PostgreSQL).
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import {
  createDb,
  ensureDatabase,
  localCluster,
  migrateToLatest,
  readDatabaseConfig,
  repoRoot,
} from '@wellkept/db';
import { ingestNodeArgs } from '../ingest/src/config/node-args.js';
import { ensureSystemPackages } from './system-packages.js';

// Settings from .env at the root, if present; variables already set in the environment win.
if (existsSync(join(repoRoot, '.env'))) process.loadEnvFile(join(repoRoot, '.env'));
const env = process.env;
const ports = {
  api: Number(env.API_PORT ?? 3000),
  ingestHttp: Number(env.INGEST_HTTP_PORT ?? 3001),
  mqtt: Number(env.MQTT_PORT ?? 1883),
  mqttWs: Number(env.MQTT_WS_PORT ?? 8083),
  dashboard: Number(env.DASHBOARD_PORT ?? 5173),
  smtp: Number(env.SMTP_PORT ?? 1025),
  mailWeb: Number(env.MAILDEV_WEB_PORT ?? 1080),
};

interface Service {
  name: string;
  /** A file that exists once the workspace provides this service. */
  entry: string;
  command: string;
  args: string[];
  url?: string;
}

const services: Service[] = [
  {
    name: 'mail',
    entry: 'node_modules/maildev/dist/bin/maildev.js',
    command: process.execPath,
    args: [
      'node_modules/maildev/dist/bin/maildev.js',
      '--smtp',
      String(ports.smtp),
      '--web',
      String(ports.mailWeb),
      '--ip',
      '127.0.0.1',
      '--web-ip',
      '127.0.0.1',
    ],
    url: `http://127.0.0.1:${ports.mailWeb} (mail sent by Wellkept lands here)`,
  },
  {
    name: 'ingest',
    entry: 'ingest/dist/main.js',
    command: process.execPath,
    args: [...ingestNodeArgs(), 'ingest/dist/main.js'],
    url: `mqtt://127.0.0.1:${ports.mqtt} (gateways), http://127.0.0.1:${ports.ingestHttp}/health`,
  },
  {
    name: 'api',
    entry: 'api/dist/main.js',
    command: process.execPath,
    args: ['api/dist/main.js'],
    url: `http://127.0.0.1:${ports.api}/api/docs (OpenAPI)`,
  },
  {
    name: 'dashboard',
    entry: 'dashboard/index.html',
    command: process.execPath,
    args: [
      'node_modules/vite/bin/vite.js',
      '--config',
      'dashboard/vite.config.ts',
      '--port',
      String(ports.dashboard),
      '--strictPort',
      '--host',
      '127.0.0.1',
    ],
    url: `http://127.0.0.1:${ports.dashboard} (sign in here)`,
  },
  {
    name: 'simulator',
    entry: 'simulator/dist/cli.js',
    command: process.execPath,
    args: ['simulator/dist/cli.js', 'demo'],
  },
];

const children: ChildProcess[] = [];
let stopping = false;

function prefixed(name: string, stream: NodeJS.ReadableStream, out: NodeJS.WriteStream): void {
  let buffer = '';
  stream.setEncoding('utf8');
  stream.on('data', (chunk: string) => {
    buffer += chunk;
    const lines = buffer.split('\n');
    buffer = lines.pop() ?? '';
    for (const line of lines) out.write(`${name.padEnd(9)} | ${line}\n`);
  });
}

function startService(s: Service): void {
  const child = spawn(s.command, s.args, {
    cwd: repoRoot,
    env: { ...process.env, NODE_ENV: env.NODE_ENV ?? 'development' },
  });
  children.push(child);
  prefixed(s.name, child.stdout!, process.stdout);
  prefixed(s.name, child.stderr!, process.stderr);
  child.on('exit', (code, signal) => {
    if (!stopping)
      console.error(`${s.name.padEnd(9)} | exited (${signal ?? code}); stopping everything`);
    void shutdown(code ?? 1);
  });
}

async function shutdown(code: number): Promise<void> {
  if (stopping) return;
  stopping = true;
  console.log('\n[start] stopping services...');
  await Promise.all(
    children.map(
      (c) =>
        new Promise<void>((resolve) => {
          if (c.exitCode !== null || c.signalCode !== null) return resolve();
          const timer = setTimeout(() => c.kill('SIGKILL'), 10_000);
          c.once('exit', () => {
            clearTimeout(timer);
            resolve();
          });
          c.kill('SIGTERM');
        }),
    ),
  );
  localCluster().stop();
  console.log('[start] stopped.');
  process.exit(code);
}

async function main(): Promise<void> {
  ensureSystemPackages([]);
  console.log('[start] building (tsc -b)...');
  const build = spawnSync('npx', ['tsc', '-b'], { cwd: repoRoot, stdio: 'inherit' });
  if (build.status !== 0) throw new Error('the TypeScript build failed');

  const config = readDatabaseConfig();
  localCluster().start();
  await ensureDatabase(config.url);
  const db = createDb(config.url, { max: 2 });
  try {
    const applied = await migrateToLatest(db);
    if (applied.length) console.log(`[start] migrations applied: ${applied.join(', ')}`);
    const { seedDemo, demoSignInLines } = await import('../simulator/src/demo/seed.js');
    const seed = await seedDemo(db);
    console.log(
      seed.created ? '[start] demo scenario loaded.' : '[start] demo scenario already loaded.',
    );
    console.log('\nSign in with one of the demo accounts:');
    for (const line of demoSignInLines()) console.log(line);
  } finally {
    await db.destroy();
  }

  const running = services.filter((s) => existsSync(join(repoRoot, s.entry)));
  for (const s of running) startService(s);
  console.log('\nWellkept is running:');
  console.log(`  database   postgres://127.0.0.1:${config.port}/${config.database}`);
  for (const s of running) if (s.url) console.log(`  ${s.name.padEnd(10)} ${s.url}`);
  const missing = services.filter((s) => !running.includes(s)).map((s) => s.name);
  if (missing.length) console.log(`  (not built yet: ${missing.join(', ')})`);
  console.log('\nPress Ctrl-C to stop everything.\n');
  if (running.length === 0) {
    console.log('[start] no services yet: the database keeps running until Ctrl-C.');
  }
}

process.on('SIGINT', () => void shutdown(0));
process.on('SIGTERM', () => void shutdown(0));
main().catch((error: unknown) => {
  console.error(`[start] ${error instanceof Error ? error.message : String(error)}`);
  void shutdown(1);
});
// Keep the process alive while services run (and while only the database runs).
setInterval(() => {}, 1 << 30);
