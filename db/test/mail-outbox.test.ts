import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  enqueueMail,
  isServerUnreachable,
  OutboxSender,
  outboxMessageId,
  retryDelaySeconds,
} from '../src/index.js';
import { freePort, type MailCatcher, startMailCatcher, useTestDatabase } from '../src/testing.js';

const t = useTestDatabase('db_outbox');
let mail: MailCatcher;
beforeAll(async () => {
  mail = await startMailCatcher();
});
afterAll(async () => mail?.stop());

const message = (key: string, to = `${key}@people.example`) => ({
  dedupeKey: key,
  to,
  subject: `Subject ${key}`,
  text: `Body of ${key}`,
  category: 'invitation' as const,
});

describe('e-mail outbox', () => {
  it('stores a message once per dedupe key', async () => {
    const first = await enqueueMail(t.db, message('dedupe-1'));
    const again = await enqueueMail(t.db, { ...message('dedupe-1'), subject: 'changed' });
    expect(first.created).toBe(true);
    expect(again).toEqual({ id: first.id, created: false });
    const rows = await t.db
      .selectFrom('email_outbox')
      .select('subject')
      .where('dedupe_key', '=', 'dedupe-1')
      .execute();
    expect(rows).toEqual([{ subject: 'Subject dedupe-1' }]);
  });

  it('two senders at once deliver every due message exactly once and mark it sent', async () => {
    await mail.clear();
    await t.db.deleteFrom('email_outbox').execute();
    for (let i = 0; i < 12; i++) await enqueueMail(t.db, message(`batch-${i}`));
    const a = new OutboxSender(t.db, mail.smtp, { batchSize: 3, log: () => {} });
    const b = new OutboxSender(t.db, mail.smtp, { batchSize: 3, log: () => {} });
    const [ra, rb] = await Promise.all([a.sendDue(), b.sendDue()]);
    await Promise.all([a.stop(), b.stop()]);
    expect(ra.sent + rb.sent).toBe(12);
    const caught = await mail.messages();
    expect(caught.map((m) => m.subject).sort()).toEqual(
      [...Array(12).keys()].map((i) => `Subject batch-${i}`).sort(),
    );
    const unsent = await t.db
      .selectFrom('email_outbox')
      .select('id')
      .where('sent_at', 'is', null)
      .execute();
    expect(unsent).toEqual([]);
  });

  it('sends in the order the mails were written, even when the rows moved on disk', async () => {
    await mail.clear();
    await t.db.deleteFrom('email_outbox').execute();
    const ids: number[] = [];
    for (let i = 0; i < 6; i++) ids.push((await enqueueMail(t.db, message(`order-${i}`))).id);
    // Updating the first rows writes new row versions after the others (as a held mail released,
    // or a claim that lapsed, does): a plain scan now meets them last.
    await t.db
      .updateTable('email_outbox')
      .set({ hold_until: null })
      .where('id', 'in', ids.slice(0, 3))
      .execute();
    const sender = new OutboxSender(t.db, mail.smtp, { batchSize: 10, log: () => {} });
    await sender.sendDue();
    await sender.stop();
    expect((await mail.messages()).map((m) => m.subject)).toEqual(
      [...Array(6).keys()].map((i) => `Subject order-${i}`),
    );
  });

  it('keeps a message that failed, with the reason, and retries it later with backoff', async () => {
    await t.db.deleteFrom('email_outbox').execute();
    await enqueueMail(t.db, message('retry-1'));
    const broken = new OutboxSender(
      t.db,
      { host: '127.0.0.1', port: 9, from: 'x@wellkept.example' },
      { log: () => {} },
    );
    const result = await broken.sendDue();
    await broken.stop();
    expect(result).toEqual({ sent: 0, failed: 1 });
    const row = await t.db
      .selectFrom('email_outbox')
      .selectAll()
      .where('dedupe_key', '=', 'retry-1')
      .executeTakeFirstOrThrow();
    expect(row.sent_at).toBeNull();
    expect(row.attempts).toBe(1);
    expect(row.last_error).toBeTruthy();
    expect(row.next_attempt_at.getTime()).toBeGreaterThan(Date.now() + 20_000);
    expect([1, 2, 3, 10].map(retryDelaySeconds)).toEqual([30, 60, 120, 3600]);

    // Not due yet: a working sender leaves it; once due, it goes out.
    const good = new OutboxSender(t.db, mail.smtp, { log: () => {} });
    expect(await good.sendDue()).toEqual({ sent: 0, failed: 0 });
    await t.db
      .updateTable('email_outbox')
      .set({ next_attempt_at: new Date() })
      .where('dedupe_key', '=', 'retry-1')
      .execute();
    expect(await good.sendDue()).toEqual({ sent: 1, failed: 0 });
    await good.stop();
    await mail.waitFor((m) => m.subject === 'Subject retry-1');
  });

  it('gives a message the same Message-ID on every attempt, so a repeat can be recognised', async () => {
    await mail.clear();
    await t.db.deleteFrom('email_outbox').execute();
    const { id } = await enqueueMail(t.db, message('stable-id-1'));
    const sender = new OutboxSender(t.db, mail.smtp, { log: () => {} });
    expect(await sender.sendDue()).toEqual({ sent: 1, failed: 0 });
    // The answer to the first attempt was lost (the process died before marking it sent).
    await t.db
      .updateTable('email_outbox')
      .set({ sent_at: null, next_attempt_at: new Date() })
      .where('id', '=', id)
      .execute();
    expect(await sender.sendDue()).toEqual({ sent: 1, failed: 0 });
    await sender.stop();
    const res = await fetch(`http://127.0.0.1:${mail.webPort}/api/email`);
    const caught = (await res.json()) as { headers: Record<string, string> }[];
    expect(caught.map((m) => m.headers['message-id'])).toEqual([
      `<outbox-${id}@wellkept.example>`,
      `<outbox-${id}@wellkept.example>`,
    ]);
    expect(outboxMessageId(7, 'Wellkept <alerts@watch.example>')).toBe('<outbox-7@watch.example>');
  });

  it('sends mail held through an SMTP outage as soon as the server answers, not after its backoff', async () => {
    await t.db.deleteFrom('email_outbox').execute();
    const smtpPort = await freePort();
    const webPort = await freePort();
    const smtp = { host: '127.0.0.1', port: smtpPort, from: 'Wellkept <alerts@wellkept.example>' };
    for (let i = 0; i < 3; i++) await enqueueMail(t.db, message(`outage-${i}`));
    // An hour's backoff after every failure, rounds every 0.2 s: only the probe can send early.
    const sender = new OutboxSender(t.db, smtp, {
      intervalSeconds: 0.2,
      retryDelay: () => 3600,
      log: () => {},
    });
    sender.start();
    const waiting = async () =>
      t.db
        .selectFrom('email_outbox')
        .select(['waiting_for_server', 'next_attempt_at', 'attempts', 'last_error'])
        .where('dedupe_key', 'like', 'outage-%')
        .execute();
    for (let tries = 0; ; tries++) {
      const rows = await waiting();
      if (rows.every((r) => r.attempts >= 1 && r.waiting_for_server)) break;
      if (tries > 100) throw new Error(`messages never failed: ${JSON.stringify(rows)}`);
      await new Promise((r) => setTimeout(r, 100));
    }
    const held = await waiting();
    expect(held.every((r) => r.next_attempt_at.getTime() > Date.now() + 3000_000)).toBe(true);
    expect(held.every((r) => /ECONNREFUSED|connect/i.test(r.last_error ?? ''))).toBe(true);

    const back = await startMailCatcher({ smtpPort, webPort });
    try {
      for (let i = 0; i < 3; i++)
        await back.waitFor((m) => m.subject === `Subject outage-${i}`, 15_000);
      const rows = await t.db
        .selectFrom('email_outbox')
        .select(['sent_at', 'waiting_for_server'])
        .where('dedupe_key', 'like', 'outage-%')
        .execute();
      expect(rows.every((r) => r.sent_at !== null)).toBe(true);
      expect(await back.messages()).toHaveLength(3); // once each
    } finally {
      await sender.stop();
      await back.stop();
    }
  });

  it('retries early only failures to reach the server, not messages the server refused', () => {
    const refused = Object.assign(new Error('connect ECONNREFUSED'), { code: 'ESOCKET' });
    const timedOut = Object.assign(new Error('Greeting never received'), { code: 'ETIMEDOUT' });
    const busy = Object.assign(new Error('421 try later'), {
      code: 'EENVELOPE',
      responseCode: 421,
    });
    const rejected = Object.assign(new Error('550 no such user'), {
      code: 'EENVELOPE',
      responseCode: 550,
    });
    expect([refused, timedOut, busy].map(isServerUnreachable)).toEqual([true, true, true]);
    expect([rejected, new Error('x'), null].map(isServerUnreachable)).toEqual([
      false,
      false,
      false,
    ]);
  });

  it('holds a message until its hold time (quiet hours)', async () => {
    await t.db.deleteFrom('email_outbox').execute();
    await enqueueMail(t.db, { ...message('held-1'), holdUntil: new Date(Date.now() + 3600_000) });
    const sender = new OutboxSender(t.db, mail.smtp, { log: () => {} });
    expect(await sender.sendDue()).toEqual({ sent: 0, failed: 0 });
    await sender.stop();
  });
});
