import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { ensurePostgresInstalled } from '@wellkept/db';

/** Debian packages the project needs, each found by a file it installs. */
const packages = {
  chromium: '/usr/bin/chromium',
  'mosquitto-clients': '/usr/bin/mosquitto_pub',
  // Shared broker state and the TCP balancer of the two-node ingest tests and benchmark; the
  // tests start their own instances on free loopback ports, never the system services.
  'redis-server': '/usr/bin/redis-server',
  haproxy: '/usr/sbin/haproxy',
} as const;

export type SystemPackage = keyof typeof packages;

/**
 * Installs the named Debian packages that are missing (one `apt-get update`, then one
 * `apt-get install`), and PostgreSQL's server. Says what it does; does nothing when all are
 * present.
 */
export function ensureSystemPackages(
  wanted: SystemPackage[],
  log = (m: string) => console.log(`[setup] ${m}`),
): void {
  ensurePostgresInstalled(log);
  const missing = wanted.filter((name) => !existsSync(packages[name]));
  if (missing.length === 0) return;
  if (process.getuid?.() !== 0) {
    throw new Error(
      `Missing Debian packages: ${missing.join(', ')}. Install them with: sudo apt-get install -y ${missing.join(' ')}`,
    );
  }
  log(`installing Debian packages: ${missing.join(', ')} (apt-get)...`);
  execFileSync('apt-get', ['update'], { stdio: 'inherit' });
  execFileSync('apt-get', ['install', '-y', '--no-install-recommends', ...missing], {
    stdio: 'inherit',
    env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' },
  });
}
