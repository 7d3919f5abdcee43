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

/** The UTC day a `readings` partition holds, from its name (`readings_pYYYYMMDD`), or null. */
export function rawPartitionDay(name: string): Date | null {
  const match = /^readings_p(\d{4})(\d{2})(\d{2})$/.exec(name);
  return match
    ? new Date(Date.UTC(Number(match[1]), Number(match[2]) - 1, Number(match[3])))
    : null;
}

/**
 * Where raw readings begin: the first day of the oldest `readings` partition, or null when
 * there is none. Ingest drops whole days past the raw retention, so from here on raw readings
 * are complete; before it only the buckets remain.
 */
export async function rawReadingsKeptFrom(
  db: Kysely<any>, // eslint-disable-line @typescript-eslint/no-explicit-any
): Promise<Date | null> {
  const { rows } = await sql<{ name: string }>`
    select c.relname as name
    from pg_inherits i join pg_class c on c.oid = i.inhrelid
    where i.inhparent = 'readings'::regclass`.execute(db);
  let oldest: Date | null = null;
  for (const { name } of rows) {
    const day = rawPartitionDay(name);
    if (day && (!oldest || day < oldest)) oldest = day;
  }
  return oldest;
}
