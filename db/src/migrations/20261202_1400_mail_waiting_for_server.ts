import { sql, type Kysely } from 'kysely';

/**
 * Marks outbox messages whose last attempt failed because the SMTP server could not be reached
 * (refused, timed out, connection dropped), as opposed to a server that answered and refused the
 * message. Senders probe the server while such messages wait and, once it answers again, send
 * them at once instead of waiting out a backoff that may have grown to an hour during the outage.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`
alter table email_outbox add column waiting_for_server boolean not null default false;
create index email_outbox_waiting_for_server on email_outbox (next_attempt_at)
  where sent_at is null and waiting_for_server;
`.execute(db);
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`
drop index email_outbox_waiting_for_server;
alter table email_outbox drop column waiting_for_server;
`.execute(db);
}
