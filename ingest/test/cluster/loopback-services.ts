/**
 * Project-local Redis, HAProxy and ingest processes for the two-node tests and benchmark. Each
 * runs in the foreground as a child of this process, on a free loopback port, with its
 * configuration in a temporary folder; the system services the Debian packages install are
 * never used. `npm test` installs the packages when missing (scripts/system-packages.ts).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { connect } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { freePort, repoRoot } from '@wellkept/db';
import { ingestNodeArgs } from '../../src/config/node-args.js';

const REDIS_SERVER = '/usr/bin/redis-server';
const HAPROXY = '/usr/sbin/haproxy';
const INGEST_MAIN = join(repoRoot, 'ingest/dist/main.js');

/** Lines a child printed last, to explain a failure. */
class OutputTail {
  private readonly lines: string[] = [];
  constructor(
    child: ChildProcess,
    private readonly keep = 60,
  ) {
    const add = (chunk: Buffer) => {
      for (const line of chunk.toString('utf8').split('\n')) {
        if (!line) continue;
        this.lines.push(line);
        if (this.lines.length > this.keep) this.lines.shift();
      }
    };
    child.stdout?.on('data', add);
    child.stderr?.on('data', add);
  }
  toString(): string {
    return this.lines.join('\n');
  }
}

export interface LocalProcess {
  readonly child: ChildProcess;
  readonly port: number;
  readonly output: OutputTail;
  /** SIGTERM, then SIGKILL after `graceMs`; resolves once the process is gone. */
  stop(graceMs?: number): Promise<void>;
}

function exited(child: ChildProcess): boolean {
  return child.exitCode !== null || child.signalCode !== null;
}

async function stopChild(child: ChildProcess, graceMs: number): Promise<void> {
  if (exited(child)) return;
  const gone = new Promise<void>((resolve) => child.once('exit', () => resolve()));
  child.kill('SIGTERM');
  const timer = setTimeout(() => child.kill('SIGKILL'), graceMs);
  await gone;
  clearTimeout(timer);
}

function tcpOpen(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const socket = connect(port, '127.0.0.1');
    socket.once('connect', () => {
      socket.destroy();
      resolve(true);
    });
    socket.once('error', () => resolve(false));
  });
}

async function waitUntil(
  child: ChildProcess,
  output: OutputTail,
  what: string,
  ready: () => Promise<boolean>,
  timeoutMs = 30_000,
): Promise<void> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    if (exited(child)) throw new Error(`${what} exited while starting:\n${output.toString()}`);
    if (await ready()) return;
    if (Date.now() > until) throw new Error(`${what} not ready after ${timeoutMs} ms:\n${output}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

function need(binary: string, pkg: string): void {
  if (!existsSync(binary)) {
    throw new Error(`${binary} is missing: install Debian's ${pkg} (npm test installs it)`);
  }
}

/** A folder for configuration files; removed by the returned function. */
export function scratchFolder(prefix: string): { dir: string; remove(): void } {
  const dir = mkdtempSync(join(tmpdir(), `wellkept-${prefix}-`));
  return { dir, remove: () => rmSync(dir, { recursive: true, force: true }) };
}

/** Redis on a free loopback port, nothing saved to disk (broker state for one run). */
export async function startRedis(dir: string): Promise<LocalProcess & { url: string }> {
  need(REDIS_SERVER, 'redis-server');
  const port = await freePort();
  const config = join(dir, `redis-${port}.conf`);
  writeFileSync(
    config,
    [
      `port ${port}`,
      'bind 127.0.0.1',
      'protected-mode yes',
      'daemonize no',
      `dir ${dir}`,
      'save ""',
      'appendonly no',
      'logfile ""',
      'loglevel warning',
      // Enough for thousands of gateway sessions of one benchmark run.
      'maxclients 10000',
    ].join('\n') + '\n',
  );
  const child = spawn(REDIS_SERVER, [config], { stdio: ['ignore', 'pipe', 'pipe'] });
  const output = new OutputTail(child);
  await waitUntil(child, output, 'redis-server', () => tcpOpen(port));
  return {
    child,
    port,
    output,
    url: `redis://127.0.0.1:${port}/0`,
    stop: (graceMs = 5000) => stopChild(child, graceMs),
  };
}

export interface Backend {
  name: string;
  port: number;
}

/**
 * HAProxy in TCP mode, round-robin over the given MQTT ports, health-checking each every
 * 500 ms. A connection to a node that just died is re-dispatched to another (retries +
 * redispatch), so reconnecting gateways land on a live node.
 */
export async function startHaproxy(
  dir: string,
  backends: Backend[],
  maxConnections = 4000,
): Promise<LocalProcess> {
  need(HAPROXY, 'haproxy');
  const port = await freePort();
  const config = join(dir, `haproxy-${port}.cfg`);
  writeFileSync(
    config,
    [
      'global',
      // Two descriptors per proxied connection; HAProxy refuses to start if the process
      // limit (ulimit -n) cannot cover maxconn, so keep it to what the run needs.
      `  maxconn ${maxConnections + 100}`,
      '',
      'defaults',
      '  mode tcp',
      '  timeout connect 2s',
      // Longer than any gateway keep-alive (600 s at most), so idle gateways are not cut.
      '  timeout client 15m',
      '  timeout server 15m',
      '  retries 3',
      '  option redispatch',
      '',
      'frontend mqtt',
      `  bind 127.0.0.1:${port}`,
      `  maxconn ${maxConnections}`,
      '  default_backend ingest',
      '',
      'backend ingest',
      '  balance roundrobin',
      ...backends.map(
        (b) => `  server ${b.name} 127.0.0.1:${b.port} check inter 500 fall 2 rise 2`,
      ),
    ].join('\n') + '\n',
  );
  // -db: stay in the foreground, logs to stderr; -W is not used (no master process).
  const child = spawn(HAPROXY, ['-db', '-f', config], { stdio: ['ignore', 'pipe', 'pipe'] });
  const output = new OutputTail(child);
  await waitUntil(child, output, 'haproxy', () => tcpOpen(port));
  return { child, port, output, stop: (graceMs = 5000) => stopChild(child, graceMs) };
}

export interface IngestNode extends LocalProcess {
  name: string;
  httpPort: number;
  /** SIGKILL: the node dies at once, nothing flushed, no will published. */
  kill(): Promise<void>;
}

/**
 * One ingest process (ingest/dist/main.js, built by `tsc -b`) on free loopback ports, in the
 * given broker mode. Resolves once /health answers 200.
 */
export async function startIngestNode(options: {
  name: string;
  databaseUrl: string;
  redisUrl?: string;
  env?: NodeJS.ProcessEnv;
}): Promise<IngestNode> {
  if (!existsSync(INGEST_MAIN)) throw new Error(`${INGEST_MAIN} is missing: run npx tsc -b`);
  const port = await freePort();
  const httpPort = await freePort();
  const child = spawn(process.execPath, [...ingestNodeArgs(), INGEST_MAIN], {
    cwd: repoRoot,
    env: {
      ...process.env,
      DATABASE_URL: options.databaseUrl,
      INGEST_HOST: '127.0.0.1',
      MQTT_PORT: String(port),
      MQTT_WS_PORT: String(await freePort()),
      INGEST_HTTP_PORT: String(httpPort),
      INGEST_BROKER_MODE: options.redisUrl ? 'shared' : 'single',
      ...(options.redisUrl ? { REDIS_URL: options.redisUrl } : {}),
      LOG_LEVEL: 'warn',
      ...options.env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const output = new OutputTail(child);
  await waitUntil(
    child,
    output,
    `ingest node ${options.name}`,
    () =>
      fetch(`http://127.0.0.1:${httpPort}/health`, { signal: AbortSignal.timeout(2000) }).then(
        async (r) => {
          await r.body?.cancel();
          return r.status === 200;
        },
        () => false,
      ),
    60_000,
  );
  return {
    name: options.name,
    child,
    port,
    httpPort,
    output,
    stop: (graceMs = 30_000) => stopChild(child, graceMs),
    async kill() {
      if (exited(child)) return;
      const gone = new Promise<void>((resolve) => child.once('exit', () => resolve()));
      child.kill('SIGKILL');
      await gone;
    },
  };
}
