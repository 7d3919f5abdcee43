import { sql, type Kysely } from 'kysely';

/**
 * Book-keeping for ingest's bucket roll-up (see ingest/src/storage/rollup.service.ts):
 * - `rollup_state` holds how far the sweep has rolled closed minutes up from raw readings, so a
 *   restarted service resumes where it stopped;
 * - `rollup_pending` lists (site, minute) pairs that received rows after their minute was
 *   rolled up (late or store-and-forward data); the sweep recomputes them and deletes the rows.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`
create table rollup_state (
  name text primary key,
  watermark timestamptz not null,
  updated_at timestamptz not null default now()
);

create table rollup_pending (
  site_id uuid not null,
  minute timestamptz not null,
  marked_at timestamptz not null default now(),
  primary key (site_id, minute)
);
`.execute(db);
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`drop table if exists rollup_pending, rollup_state`.execute(db);
}
