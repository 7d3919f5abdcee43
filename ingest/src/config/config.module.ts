import {
  Global,
  Inject,
  Injectable,
  Module,
  type DynamicModule,
  type OnApplicationShutdown,
} from '@nestjs/common';
import { createPool, type DB } from '@wellkept/db';
import { Kysely, PostgresDialect } from 'kysely';
import type { Logger } from 'pino';
import { DATABASE, WRITER_DATABASE, type Database } from '../database/database.js';
import { LOGGER } from '../logging/logger.js';
import { INGEST_CONFIG, type IngestConfig } from './ingest-config.js';

/** Closes the pools last: Nest runs every `beforeApplicationShutdown` (flushes) before this. */
@Injectable()
class DatabaseCloser implements OnApplicationShutdown {
  constructor(
    @Inject(DATABASE) private readonly db: Database,
    @Inject(WRITER_DATABASE) private readonly writerDb: Database,
  ) {}

  async onApplicationShutdown(): Promise<void> {
    await Promise.all([this.db.destroy(), this.writerDb.destroy()]);
  }
}

function openDatabase(url: string, max: number, name: string, logger: Logger): Database {
  const pool = createPool(url, { max, applicationName: name });
  // An idle connection dropped by a restarting server must not crash the process; the pool
  // replaces it, and commits in flight fail and are re-sent by the gateways.
  pool.on('error', (error) => logger.warn({ err: error.message }, 'idle database connection lost'));
  // A connection lost while checked out also emits 'error' (its query fails too); without a
  // listener that would be an uncaught exception.
  pool.on('connect', (client) => client.on('error', () => undefined));
  return new Kysely<DB>({ dialect: new PostgresDialect({ pool }) });
}

/**
 * What every module of the service shares: the validated settings, the logger and the
 * database pools. Built from values read once in main.ts (or given by a test).
 */
@Global()
@Module({})
export class ConfigModule {
  static forRoot(config: IngestConfig, logger: Logger): DynamicModule {
    return {
      module: ConfigModule,
      providers: [
        { provide: INGEST_CONFIG, useValue: config },
        { provide: LOGGER, useValue: logger },
        {
          provide: DATABASE,
          useFactory: () =>
            openDatabase(config.databaseUrl, config.dbPoolSize, 'wellkept-ingest', logger),
        },
        {
          provide: WRITER_DATABASE,
          useFactory: () =>
            openDatabase(
              config.databaseUrl,
              config.commitConcurrency,
              'wellkept-ingest-writer',
              logger,
            ),
        },
        DatabaseCloser,
      ],
      exports: [INGEST_CONFIG, LOGGER, DATABASE, WRITER_DATABASE],
    };
  }
}
