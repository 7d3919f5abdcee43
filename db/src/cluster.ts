import { execFileSync, spawnSync, type SpawnSyncReturns } from 'node:child_process';
import {
  chmodSync,
  chownSync,
  existsSync,
  mkdirSync,
  readdirSync,
  readFileSync,
  rmSync,
  writeFileSync,
} from 'node:fs';
import { tmpdir, userInfo } from 'node:os';
import { join } from 'node:path';

/**
 * A project-local PostgreSQL cluster: Debian's server binaries, a data folder of our own, a
 * loopback-only listener on a project port. It never touches the system-wide cluster.
 *
 * initdb refuses to run as root, and CI runs as root, so when we are root every server
 * command runs as the `postgres` system user (created by Debian's package) on a data folder
 * that user owns.
 */
export interface ClusterOptions {
  dataDir: string;
  port: number;
  superuser: string;
  password: string;
  /** Faster, non-durable settings for throw-away test clusters (fsync off). */
  ephemeral?: boolean;
  /** More server settings (`name=value`), e.g. a benchmark loading pg_stat_statements. */
  settings?: readonly string[];
  log?: (message: string) => void;
}

export type ClusterState = 'running' | 'stopped' | 'absent';

const isRoot = () => typeof process.getuid === 'function' && process.getuid() === 0;

/** The newest installed PostgreSQL server's bin folder, or undefined. */
export function findPostgresBin(): string | undefined {
  const base = '/usr/lib/postgresql';
  if (!existsSync(base)) return undefined;
  const versions = readdirSync(base)
    .filter((v) => existsSync(join(base, v, 'bin', 'initdb')))
    .sort((a, b) => Number(b) - Number(a));
  return versions[0] ? join(base, versions[0], 'bin') : undefined;
}

/**
 * Installs Debian's `postgresql` package when the server binaries are missing. Service
 * start-up is blocked during the install (policy-rc.d) so the system-wide cluster that the
 * package creates is not started by us.
 */
export function ensurePostgresInstalled(log: (m: string) => void = console.log): string {
  const found = findPostgresBin();
  if (found) return found;
  if (!isRoot()) {
    throw new Error(
      'PostgreSQL server binaries are missing (/usr/lib/postgresql/*/bin/initdb). ' +
        'Install them with: sudo apt-get update && sudo apt-get install -y postgresql',
    );
  }
  log('PostgreSQL server binaries not found: installing Debian package "postgresql" (apt-get)...');
  const policy = '/usr/sbin/policy-rc.d';
  const hadPolicy = existsSync(policy);
  if (!hadPolicy) writeFileSync(policy, '#!/bin/sh\nexit 101\n', { mode: 0o755 });
  try {
    execFileSync('apt-get', ['update'], { stdio: 'inherit' });
    execFileSync('apt-get', ['install', '-y', '--no-install-recommends', 'postgresql'], {
      stdio: 'inherit',
      env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' },
    });
  } finally {
    if (!hadPolicy) rmSync(policy, { force: true });
  }
  const bin = findPostgresBin();
  if (!bin)
    throw new Error('apt-get finished but /usr/lib/postgresql/*/bin/initdb is still missing');
  log(`PostgreSQL installed (${bin}).`);
  return bin;
}

function run(
  bin: string,
  args: string[],
  opts: { allowFail?: boolean } = {},
): SpawnSyncReturns<string> {
  const [cmd, cmdArgs] = isRoot()
    ? ['runuser', ['-u', 'postgres', '--', bin, ...args]]
    : [bin, args];
  const result = spawnSync(cmd, cmdArgs, { encoding: 'utf8', cwd: tmpdir() });
  if (result.error) throw result.error;
  if (result.status !== 0 && !opts.allowFail) {
    throw new Error(
      `${bin} ${args.join(' ')} failed (exit ${result.status}):\n${result.stderr || result.stdout}`,
    );
  }
  return result;
}

/** Can the `postgres` user reach this folder? (a root-only checkout would stop the server) */
function postgresCanReach(dir: string): boolean {
  if (!isRoot()) return true;
  return spawnSync('runuser', ['-u', 'postgres', '--', 'test', '-x', dir]).status === 0;
}

export class PostgresCluster {
  private readonly bin: string;
  private readonly log: (m: string) => void;

  constructor(private readonly options: ClusterOptions) {
    this.log = options.log ?? ((m) => console.log(`[postgres] ${m}`));
    this.bin = ensurePostgresInstalled(this.log);
  }

  get dataDir(): string {
    return this.options.dataDir;
  }

  get port(): number {
    return this.options.port;
  }

  private tool(name: string): string {
    return join(this.bin, name);
  }

  state(): ClusterState {
    if (!existsSync(join(this.options.dataDir, 'PG_VERSION'))) return 'absent';
    const r = run(this.tool('pg_ctl'), ['status', '-D', this.options.dataDir], { allowFail: true });
    return r.status === 0 ? 'running' : 'stopped';
  }

  /** Creates the cluster on first use. Idempotent. */
  init(): void {
    const { dataDir, superuser, password } = this.options;
    if (existsSync(join(dataDir, 'PG_VERSION'))) return;
    mkdirSync(dataDir, { recursive: true });
    if (!postgresCanReach(dataDir)) {
      throw new Error(
        `The postgres system user cannot reach ${dataDir} (a parent folder is not searchable). ` +
          'Set WELLKEPT_DATA_DIR to a folder it can reach, e.g. /var/tmp/wellkept.',
      );
    }
    chmodSync(dataDir, 0o700);
    const pwfile = join(tmpdir(), `wellkept-pw-${process.pid}-${Date.now()}`);
    writeFileSync(pwfile, `${password}\n`, { mode: 0o600 });
    if (isRoot()) {
      const uid = Number(execFileSync('id', ['-u', 'postgres'], { encoding: 'utf8' }).trim());
      const gid = Number(execFileSync('id', ['-g', 'postgres'], { encoding: 'utf8' }).trim());
      chownSync(dataDir, uid, gid);
      chownSync(pwfile, uid, gid);
    }
    this.log(`creating a project-local cluster in ${dataDir} (superuser "${superuser}")`);
    try {
      run(this.tool('initdb'), [
        '-D',
        dataDir,
        '-U',
        superuser,
        `--pwfile=${pwfile}`,
        '-E',
        'UTF8',
        '--no-locale',
        '--auth-local=trust',
        '--auth-host=scram-sha-256',
      ]);
    } finally {
      rmSync(pwfile, { force: true });
    }
  }

  /** Starts the server (creating the cluster first if needed). Idempotent. */
  start(): void {
    this.init();
    if (this.state() === 'running') {
      this.log(`already running on 127.0.0.1:${this.options.port}`);
      return;
    }
    const { dataDir, port } = this.options;
    const settings = [
      `-p ${port}`,
      '-c listen_addresses=127.0.0.1',
      `-k ${dataDir}`,
      '-c max_connections=300',
      ...(this.options.ephemeral
        ? ['-c fsync=off', '-c full_page_writes=off', '-c synchronous_commit=off']
        : // Telemetry writes WAL fast (about 1 GB in the ingest benchmark's few minutes); with
          // the default 1 GB, WAL volume forced checkpoints during full load, each followed by
          // a burst of full-page writes while gateways wait for commits. Checkpoints by time.
          ['-c max_wal_size=4GB', '-c checkpoint_timeout=15min']),
      ...(this.options.settings ?? []).map((s) => `-c ${s}`),
    ].join(' ');
    this.log(`starting on 127.0.0.1:${port} (data in ${dataDir})`);
    const r = run(
      this.tool('pg_ctl'),
      ['start', '-D', dataDir, '-w', '-t', '60', '-l', join(dataDir, 'server.log'), '-o', settings],
      { allowFail: true },
    );
    if (r.status !== 0) {
      throw new Error(
        `PostgreSQL did not start on port ${port}:\n${r.stdout}${r.stderr}\n${this.logTail()}`,
      );
    }
  }

  /** Stops the server. `immediate` is a crash-like stop (used by the fault tests). Idempotent. */
  stop(mode: 'fast' | 'immediate' | 'smart' = 'fast'): void {
    const state = this.state();
    if (state !== 'running') {
      this.log(state === 'absent' ? 'no cluster to stop' : 'already stopped');
      return;
    }
    this.log(`stopping (${mode})`);
    run(this.tool('pg_ctl'), ['stop', '-D', this.options.dataDir, '-m', mode, '-w', '-t', '60']);
  }

  /** Stops the server and deletes its data folder. */
  destroy(): void {
    this.stop('immediate');
    rmSync(this.options.dataDir, { recursive: true, force: true });
  }

  logTail(lines = 20): string {
    const file = join(this.options.dataDir, 'server.log');
    if (!existsSync(file)) return '';
    return readFileSync(file, 'utf8').split('\n').slice(-lines).join('\n');
  }
}

/** Who the server commands run as, for messages. */
export function serverUser(): string {
  return isRoot() ? 'postgres' : userInfo().username;
}
