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

/**
 * Where a partition of a time-partitioned table begins (UTC), from its name
 * (`<table>_pYYYYMMDD`, as `ensure_time_partitions` names them), or null for another name.
 */
export function partitionStart(table: keyof typeof partitionedTables, name: string): Date | null {
  const match = /^(.+)_p(\d{4})(\d{2})(\d{2})$/.exec(name);
  if (!match || match[1] !== table) return null;
  return new Date(Date.UTC(Number(match[2]), Number(match[3]) - 1, Number(match[4])));
}

/** Where the partition that begins at `start` ends (a day or a month later, by table). */
export function partitionEnd(table: keyof typeof partitionedTables, start: Date): Date {
  const end = new Date(start);
  if (partitionedTables[table] === '1 month') end.setUTCMonth(end.getUTCMonth() + 1);
  else end.setUTCDate(end.getUTCDate() + 1);
  return end;
}

/** The partitions of a time-partitioned table, each with where it begins. */
export async function partitionsOf(
  db: Kysely<any>, // eslint-disable-line @typescript-eslint/no-explicit-any
  table: keyof typeof partitionedTables,
): Promise<{ name: string; start: Date }[]> {
  const { rows } = await sql<{ name: string }>`
    select c.relname as name
    from pg_inherits i join pg_class c on c.oid = i.inhrelid
    where i.inhparent = ${table}::regclass`.execute(db);
  return rows.flatMap(({ name }) => {
    const start = partitionStart(table, name);
    return start ? [{ name, start }] : [];
  });
}

/**
 * Where a time-partitioned table's data begin: the start of its oldest partition, or null when
 * it has none. Ingest drops whole partitions past each retention (raw readings by day, minute
 * buckets by month), so from here on the table is complete; before it only coarser buckets
 * remain.
 */
export async function keptFrom(
  db: Kysely<any>, // eslint-disable-line @typescript-eslint/no-explicit-any
  table: keyof typeof partitionedTables,
): Promise<Date | null> {
  let oldest: Date | null = null;
  for (const { start } of await partitionsOf(db, table)) {
    if (!oldest || start < oldest) oldest = start;
  }
  return oldest;
}
