import { Global, Inject, Logger, Module, type OnApplicationShutdown } from '@nestjs/common';
import { createPool, type DB, type Database } from '@wellkept/db';
import { Kysely, PostgresDialect } from 'kysely';
import { API_CONFIG, type ApiConfig } from '../config/api-config.js';

/** Injection token of the process's one `Kysely<DB>` (one pool per API process). */
export const DATABASE = Symbol('DATABASE');

/** Injects the database: `@InjectDb() private readonly db: Database`. */
export const InjectDb = (): ParameterDecorator => Inject(DATABASE);

@Global()
@Module({
  providers: [
    {
      provide: DATABASE,
      inject: [API_CONFIG],
      useFactory: (config: ApiConfig): Database => {
        const pool = createPool(config.databaseUrl, { max: 10, applicationName: 'wellkept-api' });
        // A restarting or crashed database drops idle connections, and pg reports that as an
        // 'error' event on the pool: without a listener it is an uncaught exception and the API
        // exits (found by the fault runs, issue 9). The pool replaces the connection; requests
        // meanwhile fail with a 500 and succeed again once the database is back.
        const logger = new Logger('database');
        pool.on('error', (error) => logger.warn(`idle database connection lost: ${error.message}`));
        // A connection lost while checked out emits 'error' too (its query fails and answers).
        pool.on('connect', (client) => client.on('error', () => undefined));
        return new Kysely<DB>({ dialect: new PostgresDialect({ pool }) });
      },
    },
  ],
  exports: [DATABASE],
})
export class DatabaseModule implements OnApplicationShutdown {
  constructor(@InjectDb() private readonly db: Database) {}

  async onApplicationShutdown(): Promise<void> {
    await this.db.destroy();
  }
}
