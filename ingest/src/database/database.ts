import type { Database } from '@wellkept/db';

/** Injection token for the service's `Kysely<DB>` (one pool per process). */
export const DATABASE = Symbol('DATABASE');

export type { Database };
