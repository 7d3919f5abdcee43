import { sql, type Kysely } from 'kysely';

/**
 * What an open pump run's samples add up to so far (ingest's `OpenRunCarry`, as JSON), so the
 * roll-up sweep continues a run from there instead of reading its samples again from its start
 * every minute. A pump left on (a solar pump's whole day, a stuck float) used to cost a read of
 * every sample since it started, on every sweep. Null for ended runs; a derivation state, not a
 * figure, so the API never reads it.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`alter table pump_runs add column open_run_carry jsonb`.execute(db);
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`alter table pump_runs drop column open_run_carry`.execute(db);
}
