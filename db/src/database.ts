import { Kysely, PostgresDialect } from 'kysely';
import pg from 'pg';
import type { DB } from './schema.js';

// int8 (bigint counts, identity ids) and numeric arrive as strings by default; the values this
// product stores fit comfortably in a double, so parse them as numbers once, here.
pg.types.setTypeParser(pg.types.builtins.INT8, (v) => Number(v));
pg.types.setTypeParser(pg.types.builtins.NUMERIC, (v) => Number(v));

export interface CreateDbOptions {
  /** Maximum pool size (default 10). */
  max?: number;
  /** Name shown in pg_stat_activity. */
  applicationName?: string;
}

/** A pg pool for the given URL, with the project's defaults. */
export function createPool(url: string, options: CreateDbOptions = {}): pg.Pool {
  return new pg.Pool({
    connectionString: url,
    max: options.max ?? 10,
    application_name: options.applicationName ?? 'wellkept',
    idleTimeoutMillis: 30_000,
  });
}

/** A typed Kysely instance over a new pool. Call `destroy()` when done. */
export function createDb(url: string, options: CreateDbOptions = {}): Kysely<DB> {
  return new Kysely<DB>({ dialect: new PostgresDialect({ pool: createPool(url, options) }) });
}

export type Database = Kysely<DB>;
