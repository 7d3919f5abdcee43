import { sql, type Kysely } from 'kysely';

/**
 * A BRIN index on the time of raw readings. The roll-up sweep reads the readings of the minutes
 * that just closed, for every site at once (a time range, no site), and the only index on
 * readings leads with the site, so each sweep read the whole day's partition: cheap in tests,
 * but a day of 10,000 gateways is over 200 million rows, read again every minute. Readings
 * arrive roughly in time order, so a block-range index finds the last minutes in a few pages,
 * costs almost nothing to keep up (autosummarize: a range is summarised once it fills) and is a
 * few hundred kilobytes a day. Created on the parent, so every partition has one.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`
    create index readings_time_brin on readings using brin (time)
      with (pages_per_range = 32, autosummarize = on)`.execute(db);
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`drop index readings_time_brin`.execute(db);
}
