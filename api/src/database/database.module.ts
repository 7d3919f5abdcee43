import { Global, Inject, Module, type OnApplicationShutdown } from '@nestjs/common';
import { createDb, type Database } from '@wellkept/db';
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
      useFactory: (config: ApiConfig): Database =>
        createDb(config.databaseUrl, { max: 10, applicationName: 'wellkept-api' }),
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
