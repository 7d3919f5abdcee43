import { join } from 'node:path';
import { PostgresCluster } from './cluster.js';
import { readDatabaseConfig } from './config.js';
import { dataRoot } from './paths.js';

/** The development cluster that `npm start` uses: .data/postgres on WELLKEPT_PG_PORT. */
export function localCluster(log?: (m: string) => void): PostgresCluster {
  const config = readDatabaseConfig();
  return new PostgresCluster({
    dataDir: join(dataRoot(), 'postgres'),
    port: config.port,
    superuser: config.user,
    password: config.password,
    log,
  });
}
