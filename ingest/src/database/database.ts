import type { Database } from '@wellkept/db';

/** Injection token for the service's shared `Kysely<DB>` (rules, roll-up, presence, mail). */
export const DATABASE = Symbol('DATABASE');

/**
 * Injection token for the group-commit writer's own pool (INGEST_COMMIT_CONCURRENCY
 * connections). PUBACKs wait for these commits; on the shared pool a commit queued behind
 * rule evaluations and roll-up sweeps for a free connection, which the benchmark showed as
 * 100–180 ms before BEGIN at 2,000 gateways.
 */
export const WRITER_DATABASE = Symbol('WRITER_DATABASE');

export type { Database };
