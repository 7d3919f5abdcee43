import { sql, type Kysely } from 'kysely';

/**
 * Book-keeping for alert mail (see ingest/src/notifications/):
 * - `alert_events.notified_at`: when the notifier turned the event into outbox rows (or decided
 *   nobody is to be told). The notifier picks up events whatever wrote them (the rules in
 *   ingest, or a person clearing an alert through the API) and marks them in the same
 *   transaction as the mail it writes, so each event is mailed once and none is forgotten
 *   across a restart. Events that exist when this migration runs count as notified.
 * - `alert_digest_items`: alert events held by a person's quiet hours, one row per person, until
 *   the quiet hours end; then one morning summary goes to `email_outbox` and the rows are marked
 *   with it in the same transaction.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`
alter table alert_events add column notified_at timestamptz;
update alert_events set notified_at = now();
create index alert_events_unnotified_idx on alert_events (id) where notified_at is null;

create table alert_digest_items (
  id bigint generated always as identity primary key,
  user_id uuid not null references users(id) on delete cascade,
  alert_event_id bigint not null references alert_events(id) on delete cascade,
  due_at timestamptz not null,
  summarised_at timestamptz,
  outbox_id bigint references email_outbox(id) on delete set null,
  created_at timestamptz not null default now(),
  unique (user_id, alert_event_id)
);
create index alert_digest_items_due_idx on alert_digest_items (due_at) where summarised_at is null;
`.execute(db);
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`
drop table if exists alert_digest_items;
drop index if exists alert_events_unnotified_idx;
alter table alert_events drop column if exists notified_at;
`.execute(db);
}
