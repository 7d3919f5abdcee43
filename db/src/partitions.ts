import { sql, type Kysely } from 'kysely';

/** Time-partitioned tables and the span of each partition. */
export const partitionedTables = {
  readings: '1 day',
  minute_buckets: '1 month',
} as const;

/**
 * Creates any missing partitions of a time-partitioned table that cover [from, to).
 * Returns how many were created. Safe to call concurrently and repeatedly.
 */
export async function ensureTimePartitions(
  db: Kysely<any>, // eslint-disable-line @typescript-eslint/no-explicit-any
  table: keyof typeof partitionedTables,
  from: Date,
  to: Date,
): Promise<number> {
  const step = partitionedTables[table];
  // CREATE TABLE IF NOT EXISTS is not atomic: two ingest nodes starting together would both
  // create the same partition and one would fail with "already exists". One lock serialises
  // the creators; it is held for the few milliseconds the (usually empty) check takes.
  const create = async (trx: typeof db) => {
    await sql`select pg_advisory_xact_lock(hashtextextended('wellkept:time-partitions', 0))`.execute(
      trx,
    );
    const { rows } = await sql<{ created: number }>`
      select ensure_time_partitions(${table}, ${step}::interval, ${from}, ${to}) as created`.execute(
      trx,
    );
    return rows[0]?.created ?? 0;
  };
  return db.isTransaction ? create(db) : db.transaction().execute(create);
}
