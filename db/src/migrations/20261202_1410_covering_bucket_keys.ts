import { sql, type Kysely } from 'kysely';

const TABLES = ['hour_buckets', 'six_hour_buckets', 'day_buckets'] as const;

/**
 * Makes the primary keys of the hour, six-hour and day buckets carry the columns a chart reads
 * (sample_count, sum, min, max), so a series is an index-only scan over a few contiguous index
 * pages instead of one heap page per point: buckets of one channel are written a few at a time
 * by every roll-up sweep, so in the heap they lie scattered among every other site's. The API
 * benchmark showed a 1-year chart spending its time there (5,840 points, p95 78 ms before).
 * Still one index per table, so the roll-up's upserts maintain no more indexes than before.
 * The minute buckets keep their plain key: they are read for short ranges only, and their key
 * is the largest index in the database.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  for (const table of TABLES) await rekey(db, table, true);
}

export async function down(db: Kysely<unknown>): Promise<void> {
  for (const table of TABLES) await rekey(db, table, false);
}

async function rekey(db: Kysely<unknown>, table: string, covering: boolean): Promise<void> {
  const { rows } = await sql<{ name: string }>`
    select conname as name from pg_constraint
     where conrelid = ${table}::regclass and contype = 'p'`.execute(db);
  const name = rows[0]?.name ?? `${table}_pkey`;
  const include = covering ? sql`include (sample_count, sum, min, max)` : sql``;
  await sql`
    alter table ${sql.table(table)}
      drop constraint ${sql.id(name)},
      add constraint ${sql.id(name)} primary key (site_id, channel_id, bucket_start) ${include}`.execute(
    db,
  );
}
