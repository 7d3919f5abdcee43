import { PostgresCluster } from '../cluster.js';
import { freePort, startThrowawayCluster } from '../throwaway-cluster.js';

export { freePort };

export const TEMPLATE_DATABASE = 'wellkept_template';

/**
 * Vitest global setup: a throw-away PostgreSQL cluster on a free loopback port with its own
 * data folder (so parallel runs do not collide), a template database migrated once that each
 * test file copies, and the cluster stopped and deleted when the run ends. Set
 * WELLKEPT_TEST_DATABASE_URL to reuse a running server instead.
 */
export default async function setup(): Promise<() => Promise<void>> {
  if (process.env.WELLKEPT_TEST_DATABASE_URL) return async () => {};
  const run = await startThrowawayCluster({
    prefix: 'test',
    database: TEMPLATE_DATABASE,
    log: (m) => console.log(`[test postgres] ${m}`),
  });
  process.env.WELLKEPT_TEST_DATABASE_URL = run.serverUrl;
  process.env.WELLKEPT_TEST_PG_DATA_DIR = run.cluster.dataDir;
  process.env.WELLKEPT_TEST_PG_PORT = String(run.cluster.port);
  return async () => run.destroy();
}

/** The test run's cluster, for tests that stop and restart the server (fault tests). */
export function testCluster(): PostgresCluster {
  const dataDir = process.env.WELLKEPT_TEST_PG_DATA_DIR;
  const port = Number(process.env.WELLKEPT_TEST_PG_PORT);
  if (!dataDir || !port) throw new Error('no test cluster in this run');
  return new PostgresCluster({
    dataDir,
    port,
    superuser: 'wellkept',
    password: 'wellkept-test',
    ephemeral: true,
  });
}
