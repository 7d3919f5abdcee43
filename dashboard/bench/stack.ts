/**
 * A whole Wellkept for the benchmark and for looking at the screens by hand: a throw-away
 * PostgreSQL on a free port, the demo company with simulated history, the built API
 * (api/dist/main.js, so run `npx tsc -b api` first) and a Vite server for the dashboard
 * (dev server, or the production build served by `vite preview`), all on free ports.
 *
 *   node --conditions=source --import tsx dashboard/bench/stack.ts [--days 7] [--step 300]
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createDb, freePort, repoRoot, startThrowawayCluster } from '@wellkept/db';
import { seedDemo } from '../../simulator/src/demo/seed.js';
import { seedHistory, seedOpenAlerts } from '../test/support/history.js';

export interface Stack {
  databaseUrl: string;
  apiUrl: string;
  dashboardUrl: string;
  stop(): Promise<void>;
}

export interface StackOptions {
  days: number;
  stepSeconds: number;
  siteNames?: string[];
  /** 'dev': Vite dev server; 'preview': serve dashboard/dist (build it first). */
  serve: 'dev' | 'preview';
  log?: (line: string) => void;
}

function waitForOutput(child: ChildProcess, pattern: RegExp, what: string): Promise<void> {
  return new Promise((resolve, reject) => {
    let seen = '';
    const onData = (chunk: Buffer) => {
      seen += chunk.toString();
      if (pattern.test(seen)) resolve();
    };
    child.stdout?.on('data', onData);
    child.stderr?.on('data', onData);
    child.once('exit', (code) =>
      reject(new Error(`${what} exited (${code}):\n${seen.slice(-2000)}`)),
    );
  });
}

export async function startStack(options: StackOptions): Promise<Stack> {
  const log = options.log ?? (() => {});
  const cluster = await startThrowawayCluster({ prefix: 'dashboard-bench' });
  const db = createDb(cluster.databaseUrl, { max: 2 });
  const children: ChildProcess[] = [];
  const stop = async () => {
    for (const c of children) if (c.exitCode === null) c.kill('SIGTERM');
    await Promise.all(
      children.map((c) => (c.exitCode === null ? new Promise((r) => c.once('exit', r)) : null)),
    );
    await db.destroy().catch(() => {});
    await cluster.destroy();
  };
  try {
    await seedDemo(db, join(mkdtempSync(join(tmpdir(), 'wk-demo-')), 'gateways.json'));
    const started = Date.now();
    const { rows } = await seedHistory(db, {
      days: options.days,
      stepSeconds: options.stepSeconds,
      siteNames: options.siteNames,
    });
    await seedOpenAlerts(db);
    log(`history: ${rows} readings in ${((Date.now() - started) / 1000).toFixed(1)} s`);

    const apiPort = await freePort();
    const api = spawn(process.execPath, ['api/dist/main.js'], {
      cwd: repoRoot,
      env: {
        ...process.env,
        NODE_ENV: 'development',
        DATABASE_URL: cluster.databaseUrl,
        API_PORT: String(apiPort),
        SMTP_PORT: '9',
        WELLKEPT_DATA_DIR: mkdtempSync(join(tmpdir(), 'wk-data-')),
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    children.push(api);
    await waitForOutput(api, /listening on/, 'the API');

    const webPort = await freePort();
    // Preview serves a fresh production build made here (never a stale dashboard/dist).
    const outDir = mkdtempSync(join(tmpdir(), 'wk-dashboard-dist-'));
    if (options.serve === 'preview') {
      const built = spawnSync(
        process.execPath,
        [
          'node_modules/vite/bin/vite.js',
          'build',
          '--config',
          'dashboard/vite.config.ts',
          '--outDir',
          outDir,
          '--logLevel',
          'warn',
        ],
        { cwd: repoRoot, stdio: 'inherit' },
      );
      if (built.status !== 0) throw new Error('vite build failed');
    }
    const web = spawn(
      process.execPath,
      [
        'node_modules/vite/bin/vite.js',
        ...(options.serve === 'preview' ? ['preview', '--outDir', outDir] : []),
        '--config',
        'dashboard/vite.config.ts',
        '--port',
        String(webPort),
        '--strictPort',
        '--host',
        '127.0.0.1',
      ],
      {
        cwd: repoRoot,
        env: { ...process.env, API_PORT: String(apiPort) },
        stdio: ['ignore', 'pipe', 'pipe'],
      },
    );
    children.push(web);
    await waitForOutput(web, new RegExp(`127\\.0\\.0\\.1:${webPort}`), 'Vite');
    return {
      databaseUrl: cluster.databaseUrl,
      apiUrl: `http://127.0.0.1:${apiPort}`,
      dashboardUrl: `http://127.0.0.1:${webPort}`,
      stop,
    };
  } catch (error) {
    await stop();
    throw error;
  }
}

// Run by hand: keep everything up until Ctrl-C.
if (import.meta.url === `file://${process.argv[1]}`) {
  const arg = (name: string, fallback: number) => {
    const i = process.argv.indexOf(name);
    return i > 0 ? Number(process.argv[i + 1]) : fallback;
  };
  const stack = await startStack({
    days: arg('--days', 3),
    stepSeconds: arg('--step', 300),
    serve: process.argv.includes('--preview') ? 'preview' : 'dev',
    siteNames: process.argv.includes('--site')
      ? [process.argv[process.argv.indexOf('--site') + 1]!]
      : undefined,
    log: console.log,
  });
  console.log(`dashboard ${stack.dashboardUrl}  api ${stack.apiUrl}  db ${stack.databaseUrl}`);
  const quit = () => void stack.stop().then(() => process.exit(0));
  process.on('SIGINT', quit);
  process.on('SIGTERM', quit);
}
