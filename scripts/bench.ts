/**
 * `npm run bench`: runs each workspace's own `bench` script in turn (each starts what it
 * needs on free ports and prints its figures and ratios). `npm run bench -- ingest api` runs
 * only those. Figures are printed, never asserted: this machine is shared and noisy.
 */
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { repoRoot } from '@wellkept/db';
import { ensureSystemPackages } from './system-packages.js';

// The two-node ingest benchmark runs project-local Redis and HAProxy.
ensureSystemPackages(['redis-server', 'haproxy']);
const workspaces = ['core', 'db', 'ingest', 'api', 'simulator', 'dashboard'];
const wanted = process.argv.slice(2);
let failed = 0;
for (const ws of wanted.length ? wanted : workspaces) {
  const pkg = JSON.parse(readFileSync(join(repoRoot, ws, 'package.json'), 'utf8')) as {
    scripts?: Record<string, string>;
  };
  if (!pkg.scripts?.bench) continue;
  console.log(`\n=== ${ws} ===`);
  const r = spawnSync('npm', ['run', 'bench', '-w', ws, '--silent'], {
    cwd: repoRoot,
    stdio: 'inherit',
  });
  if (r.status !== 0) {
    failed++;
    console.log(`(${ws} benchmark exited with ${r.status ?? r.signal})`);
  }
}
process.exit(failed ? 1 : 0);
