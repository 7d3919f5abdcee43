#!/usr/bin/env node
// Entry point of the root npm scripts. Plain JavaScript on purpose: on a fresh clone nothing
// is installed yet, so this file installs the npm packages (npm ci) when they are missing or
// out of date, then hands over to the TypeScript script named on the command line.
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const [command, ...args] = process.argv.slice(2);
const scripts = {
  start: 'scripts/start.ts',
  test: 'scripts/test.ts',
  db: 'db/src/cli.ts',
  bench: 'scripts/bench.ts',
  faults: 'scripts/faults.ts',
  simulate: 'simulator/src/cli.ts',
};

// Two commands started at once (npm start in one terminal, npm test in another) must not run
// npm ci over each other: the first takes this lock directory, the second waits and re-checks.
function withInstallLock(work) {
  const lockDir = join(root, '.npm-install.lock');
  const pidFile = join(lockDir, 'pid');
  for (;;) {
    try {
      mkdirSync(lockDir);
      writeFileSync(pidFile, String(process.pid));
      break;
    } catch {
      let holder = 0;
      try {
        holder = Number(readFileSync(pidFile, 'utf8'));
        process.kill(holder, 0);
      } catch {
        // The holder died (or has not written its pid yet: give it a moment first).
        if (holder) rmSync(lockDir, { recursive: true, force: true });
      }
      Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, 500);
    }
  }
  try {
    work();
  } finally {
    rmSync(lockDir, { recursive: true, force: true });
  }
}

function ensureNpmPackages() {
  const lock = join(root, 'package-lock.json');
  const marker = join(root, 'node_modules', '.wellkept-lock-hash');
  const hash = createHash('sha256').update(readFileSync(lock)).digest('hex');
  const upToDate = () => existsSync(marker) && readFileSync(marker, 'utf8') === hash;
  if (upToDate()) return;
  withInstallLock(() => {
    if (!upToDate()) install(marker, hash);
  });
}

function install(marker, hash) {
  // --ignore-scripts: every native package here ships prebuilt binaries (or platform packages);
  // their install scripts would try to build from source with tools the lock file lacks.
  console.log('[setup] installing npm packages (npm ci)...');
  const r = spawnSync('npm', ['ci', '--ignore-scripts', '--no-audit', '--no-fund'], {
    cwd: root,
    stdio: 'inherit',
  });
  if (r.status !== 0) process.exit(r.status ?? 1);
  writeFileSync(marker, hash);
}

const script = scripts[command];
if (!script) {
  console.error(`usage: node scripts/bootstrap.mjs ${Object.keys(scripts).join('|')} [args]`);
  process.exit(2);
}
if (!existsSync(join(root, script))) {
  console.error(`${script} does not exist yet`);
  process.exit(2);
}
ensureNpmPackages();
// `--conditions=source` resolves workspace packages to their TypeScript sources (see each
// package.json "exports"), which tsx then runs without a build step.
const r = spawnSync(
  process.execPath,
  ['--conditions=source', '--import', 'tsx', join(root, script), ...args],
  {
    cwd: root,
    stdio: 'inherit',
  },
);
process.exit(r.status ?? (r.signal ? 1 : 0));
