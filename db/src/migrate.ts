/* eslint-disable @typescript-eslint/no-explicit-any -- migrations run against any schema version */
import { Migrator, NO_MIGRATIONS, type Kysely, type MigrationResultSet } from 'kysely';
import { migrations } from './migrations/index.js';

function migrator(db: Kysely<any>): Migrator {
  return new Migrator({ db, provider: { getMigrations: async () => migrations } });
}

function check(result: MigrationResultSet, what: string): string[] {
  if (result.error) {
    const failed = result.results?.find((r) => r.status === 'Error')?.migrationName;
    const cause = result.error instanceof Error ? result.error.message : String(result.error);
    throw new Error(`${what} failed${failed ? ` at ${failed}` : ''}: ${cause}`);
  }
  return (result.results ?? []).map((r) => r.migrationName);
}

/** Applies every pending migration; returns the names applied. */
export async function migrateToLatest(db: Kysely<any>): Promise<string[]> {
  return check(await migrator(db).migrateToLatest(), 'Migration');
}

/** Reverts the most recent migration; returns its name. */
export async function migrateDown(db: Kysely<any>): Promise<string[]> {
  return check(await migrator(db).migrateDown(), 'Reverting a migration');
}

/** Reverts every migration (an empty schema). */
export async function migrateToNothing(db: Kysely<any>): Promise<string[]> {
  return check(await migrator(db).migrateTo(NO_MIGRATIONS), 'Reverting all migrations');
}
