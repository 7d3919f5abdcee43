/**
 * `npm test`: installs what is missing, type-checks and builds every workspace, then runs
 * every workspace's tests in one Vitest run. Vitest's global setup starts a throw-away
 * PostgreSQL on a free loopback port and deletes it afterwards; whatever happens, nothing
 * started here is left running.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { PostgresCluster, dataRoot, repoRoot } from '@wellkept/db';
import { ensureSystemPackages } from './system-packages.js';

function step(
  title: string,
  cmd: string,
  args: string[],
  env: NodeJS.ProcessEnv = process.env,
): number {
  console.log(`\n[test] ${title}`);
  const r = spawnSync(cmd, args, { cwd: repoRoot, stdio: 'inherit', env });
  return r.status ?? 1;
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

/**
 * Stops and deletes test clusters left behind by runs that died (their folders are named
 * after the test process's pid; clusters of runs still going are left alone).
 */
function sweepTestClusters(): void {
  const root = dataRoot();
  if (!existsSync(root)) return;
  for (const name of readdirSync(root)) {
    const pid = /^(?:test|cluster-test)-(\d+)/.exec(name)?.[1];
    if (!pid || alive(Number(pid))) continue;
    const dataDir = join(root, name);
    try {
      new PostgresCluster({ dataDir, port: 1, superuser: 'x', password: 'x', log: () => {} }).stop(
        'immediate',
      );
    } catch {
      // not a cluster, or already gone
    }
    rmSync(dataDir, { recursive: true, force: true });
  }
}

ensureSystemPackages(['chromium', 'mosquitto-clients', 'redis-server', 'haproxy']);
sweepTestClusters();
let status = step('type-check and build (tsc -b)', 'npx', ['tsc', '-b']);
if (status === 0) {
  const report = join(dataRoot(), 'vitest-report.json');
  rmSync(report, { force: true });
  status = step(
    'tests (vitest)',
    'npx',
    [
      'vitest',
      'run',
      '--reporter=default',
      '--reporter=json',
      `--outputFile.json=${report}`,
      ...process.argv.slice(2),
    ],
    { ...process.env, CI: process.env.CI ?? 'true' },
  );
  if (existsSync(report)) {
    const counts = JSON.parse(readFileSync(report, 'utf8')) as {
      numPassedTests: number;
      numFailedTests: number;
      numPendingTests: number;
    };
    // The plain closing line that CI reads, whatever the runner.
    console.log(
      `\n${counts.numPassedTests} passed, ${counts.numFailedTests} failed, ${counts.numPendingTests} skipped`,
    );
    if (counts.numFailedTests > 0 && status === 0) status = 1;
  }
}
sweepTestClusters();
process.exit(status);
