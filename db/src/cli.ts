/**
 * Database commands for developers: `npm run db -- <command>`.
 *   start | stop | status   the project-local cluster (idempotent)
 *   migrate                 apply pending migrations
 *   down                    revert the latest migration
 *   reset                   drop the database, recreate it and migrate (deletes all data)
 *   url                     print the connection URL
 */
import { ensureDatabase, dropDatabase } from './admin.js';
import { readDatabaseConfig } from './config.js';
import { createDb } from './database.js';
import { localCluster } from './local-cluster.js';
import { migrateDown, migrateToLatest } from './migrate.js';

async function main(command: string | undefined): Promise<void> {
  const config = readDatabaseConfig();
  const cluster = () => localCluster();
  switch (command) {
    case 'start':
      cluster().start();
      if (await ensureDatabase(config.url)) console.log(`created database ${config.database}`);
      return;
    case 'stop':
      cluster().stop();
      return;
    case 'status': {
      const c = cluster();
      console.log(`${c.state()} (port ${c.port}, data in ${c.dataDir})`);
      return;
    }
    case 'migrate':
    case 'down':
    case 'reset': {
      if (command === 'reset') {
        await dropDatabase(config.url);
        console.log(`dropped database ${config.database}`);
      }
      await ensureDatabase(config.url);
      const db = createDb(config.url, { max: 1 });
      try {
        const names = command === 'down' ? await migrateDown(db) : await migrateToLatest(db);
        console.log(
          names.length
            ? `${command === 'down' ? 'reverted' : 'applied'}: ${names.join(', ')}`
            : 'nothing to do',
        );
      } finally {
        await db.destroy();
      }
      return;
    }
    case 'url':
      console.log(config.url.replace(/:[^:@/]*@/, ':***@'));
      return;
    default:
      console.error('usage: npm run db -- start|stop|status|migrate|down|reset|url');
      process.exitCode = 2;
  }
}

main(process.argv[2]).catch((error: unknown) => {
  console.error(error instanceof Error ? error.message : error);
  process.exitCode = 1;
});
