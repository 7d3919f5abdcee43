import { sql } from 'kysely';
import type { Database } from '../database.js';

/** What a message is about (the `email_outbox.category` check constraint). */
export type MailCategory = 'alert' | 'summary' | 'invitation' | 'password_reset';

/** A message to be written to the outbox. */
export interface OutboxMessage {
  /** Unique per logical message: enqueueing the same key twice sends once. */
  dedupeKey: string;
  to: string;
  subject: string;
  text: string;
  html?: string | null;
  category: MailCategory;
  userId?: string | null;
  alertEventId?: number | null;
  /** Not sent before this instant (quiet hours). */
  holdUntil?: Date | null;
}

/**
 * Writes a message to `email_outbox` (before anything is sent, so a crash cannot lose it).
 * Returns the row id and whether it was new; a repeated dedupe key keeps the first message.
 * Pass a transaction to enqueue atomically with the change that caused the mail.
 */
export async function enqueueMail(
  db: Database,
  message: OutboxMessage,
): Promise<{ id: number; created: boolean }> {
  const inserted = await db
    .insertInto('email_outbox')
    .values({
      dedupe_key: message.dedupeKey,
      to_address: message.to,
      subject: message.subject,
      text_body: message.text,
      html_body: message.html ?? null,
      category: message.category,
      user_id: message.userId ?? null,
      alert_event_id: message.alertEventId ?? null,
      hold_until: message.holdUntil ?? null,
    })
    .onConflict((oc) => oc.column('dedupe_key').doNothing())
    .returning('id')
    .executeTakeFirst();
  if (inserted) return { id: inserted.id, created: true };
  const existing = await db
    .selectFrom('email_outbox')
    .select('id')
    .where('dedupe_key', '=', message.dedupeKey)
    .executeTakeFirstOrThrow();
  return { id: existing.id, created: false };
}

/** A claimed outbox row, as the sender sees it. */
export interface ClaimedMail {
  id: number;
  to: string;
  subject: string;
  text: string;
  html: string | null;
  attempts: number;
}

/**
 * Claims up to `limit` due messages for one sender. Claiming bumps `attempts` and pushes
 * `next_attempt_at` out by the lease, in one statement with `FOR UPDATE SKIP LOCKED`, so two
 * senders never claim the same row and a sender that dies mid-send leaves the row to be
 * retried after the lease instead of holding a transaction open across SMTP.
 */
export async function claimDueMail(
  db: Database,
  options: { limit: number; leaseSeconds: number; maxAttempts: number },
): Promise<ClaimedMail[]> {
  const { rows } = await sql<{
    id: number;
    to_address: string;
    subject: string;
    text_body: string;
    html_body: string | null;
    attempts: number;
  }>`
    update email_outbox
       set attempts = attempts + 1,
           waiting_for_server = false,
           next_attempt_at = now() + make_interval(secs => ${options.leaseSeconds})
     where id in (
       select id from email_outbox
        where sent_at is null
          and next_attempt_at <= now()
          and (hold_until is null or hold_until <= now())
          and attempts < ${options.maxAttempts}
        order by next_attempt_at, id
        limit ${options.limit}
        for update skip locked)
    returning id, to_address, subject, text_body, html_body, attempts`.execute(db);
  // RETURNING comes in the table's physical order, not the subquery's: an alert's "resolved"
  // mail could be sent before its "opened" one. Ids are the order the mails were written.
  rows.sort((a, b) => a.id - b.id);
  return rows.map((r) => ({
    id: r.id,
    to: r.to_address,
    subject: r.subject,
    text: r.text_body,
    html: r.html_body,
    attempts: r.attempts,
  }));
}

/** Marks a message sent; only the first call counts (`sent_at` is set once). */
export async function markMailSent(db: Database, id: number, messageId: string): Promise<boolean> {
  const r = await db
    .updateTable('email_outbox')
    .set({ sent_at: new Date(), message_id: messageId, last_error: null })
    .where('id', '=', id)
    .where('sent_at', 'is', null)
    .executeTakeFirst();
  return Number(r.numUpdatedRows) === 1;
}

/**
 * Records a failed attempt and when to try again. `serverUnreachable` marks a failure to reach
 * the SMTP server at all (see {@link releaseMailWaitingForServer}).
 */
export async function markMailFailed(
  db: Database,
  id: number,
  error: string,
  retryInSeconds: number,
  serverUnreachable = false,
): Promise<void> {
  await db
    .updateTable('email_outbox')
    .set({
      last_error: error.slice(0, 1000),
      waiting_for_server: serverUnreachable,
      next_attempt_at: sql<Date>`now() + make_interval(secs => ${retryInSeconds})`,
    })
    .where('id', '=', id)
    .where('sent_at', 'is', null)
    .execute();
}

/** Whether some message is waiting out a backoff because the SMTP server could not be reached. */
export async function hasMailWaitingForServer(db: Database, maxAttempts: number): Promise<boolean> {
  const row = await db
    .selectFrom('email_outbox')
    .select('id')
    .where('sent_at', 'is', null)
    .where('waiting_for_server', '=', true)
    .where('next_attempt_at', '>', sql<Date>`now()`)
    .where('attempts', '<', maxAttempts)
    .limit(1)
    .executeTakeFirst();
  return row !== undefined;
}

/**
 * Makes every message that was waiting for the SMTP server due now (call once the server
 * answers again). Rows claimed by a sender are not touched: claiming clears the mark, and the
 * update re-checks it under the row lock. Returns how many were released.
 */
export async function releaseMailWaitingForServer(db: Database): Promise<number> {
  const r = await db
    .updateTable('email_outbox')
    .set({ next_attempt_at: sql<Date>`now()` })
    .where('sent_at', 'is', null)
    .where('waiting_for_server', '=', true)
    .where('next_attempt_at', '>', sql<Date>`now()`)
    .executeTakeFirst();
  return Number(r.numUpdatedRows);
}
