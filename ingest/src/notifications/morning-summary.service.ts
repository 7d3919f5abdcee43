import {
  Inject,
  Injectable,
  type BeforeApplicationShutdown,
  type OnApplicationBootstrap,
} from '@nestjs/common';
import type { AlertKind } from '@wellkept/core';
import { enqueueMail } from '@wellkept/db';
import { sql } from 'kysely';
import type { Logger } from 'pino';
import { DATABASE, type Database } from '../database/database.js';
import { LOGGER } from '../logging/logger.js';
import { CLOCK, type Clock } from './clock.js';
import { MAIL_CONFIG, type MailConfig } from './mail-config.js';
import { morningSummaryMail, type HeldEvent } from './mail/summary-mail.js';
import { OutboxSenderService } from './outbox-sender.service.js';
import { RecipientsRepository } from './recipients.repository.js';

/** How often due summaries are looked for, ms. */
const CHECK_EVERY_MS = 30_000;

interface HeldRow {
  item_id: number;
  event: HeldEvent['event'];
  at: Date;
  kind: AlertKind;
  summary: string;
  note: string | null;
  subject: string;
  status: 'open' | 'acknowledged' | 'cleared';
  site_id: string;
  site_name: string;
  company_name: string;
  equipment_name: string | null;
}

/**
 * Writes each person's morning summary once their quiet hours have ended: every held event in
 * one message, written to the outbox in the same transaction that marks the items summarised
 * (dedupe key `alert-summary:<user>:<first item>`), so a restart neither loses nor repeats it.
 * Events about sites the person can no longer see are dropped from the summary.
 */
@Injectable()
export class MorningSummaryService implements OnApplicationBootstrap, BeforeApplicationShutdown {
  private timer: NodeJS.Timeout | undefined;
  private running: Promise<number> | null = null;

  constructor(
    @Inject(DATABASE) private readonly db: Database,
    private readonly recipients: RecipientsRepository,
    private readonly sender: OutboxSenderService,
    @Inject(MAIL_CONFIG) private readonly config: MailConfig,
    @Inject(CLOCK) private readonly clock: Clock,
    @Inject(LOGGER) private readonly logger: Logger,
  ) {}

  onApplicationBootstrap(): void {
    this.timer = setInterval(
      () =>
        void this.run().catch((e: unknown) =>
          this.logger.error({ err: e }, 'morning summary failed'),
        ),
      CHECK_EVERY_MS,
    );
    this.timer.unref();
  }

  async beforeApplicationShutdown(): Promise<void> {
    clearInterval(this.timer);
    await this.running?.catch(() => undefined);
  }

  /** Writes every summary that is due; resolves with how many were written. */
  run(): Promise<number> {
    if (this.running) return this.running;
    const run = this.writeDue().finally(() => {
      this.running = null;
    });
    this.running = run;
    return run;
  }

  private async writeDue(): Promise<number> {
    const now = this.clock.now();
    const users = await this.db
      .selectFrom('alert_digest_items')
      .select('user_id')
      .distinct()
      .where('summarised_at', 'is', null)
      .where('due_at', '<=', now)
      .execute();
    let written = 0;
    for (const { user_id } of users) {
      if (await this.writeFor(user_id, now)) written += 1;
    }
    if (written > 0) void this.sender.trigger();
    return written;
  }

  private writeFor(userId: string, now: Date): Promise<boolean> {
    return this.db.transaction().execute(async (trx) => {
      const { rows } = await sql<HeldRow>`
        select d.id as item_id, e.event, e.at, a.kind, a.summary, e.note, a.subject, a.status,
               s.id as site_id, s.name as site_name, c.name as company_name,
               coalesce(p.name, t.name, f.name) as equipment_name
        from alert_digest_items d
        join alert_events e on e.id = d.alert_event_id
        join alerts a on a.id = e.alert_id
        join sites s on s.id = a.site_id
        join companies c on c.id = s.company_id
        left join pumps p on p.site_id = s.id and p.key = a.subject and a.kind in ('dry_run', 'short_cycling')
        left join tanks t on t.site_id = s.id and t.key = a.subject and a.kind = 'water_low'
        left join float_switches f on f.site_id = s.id and f.key = a.subject and a.kind = 'float_stuck'
        where d.user_id = ${userId} and d.summarised_at is null and d.due_at <= ${now}
        order by e.at, d.id
        for update of d skip locked`.execute(trx);
      if (rows.length === 0) return false;
      const ids = rows.map((r) => r.item_id);
      const person = await this.recipients.person(trx, userId);
      const entitled = person
        ? await this.recipients.stillEntitled(trx, userId, [...new Set(rows.map((r) => r.site_id))])
        : new Set<string>();
      const held: HeldEvent[] = rows
        .filter((r) => entitled.has(r.site_id))
        .map((r) => ({
          event: r.event,
          at: r.at,
          kind: r.kind,
          summary: r.event === 'cleared' && r.note ? r.note : r.summary,
          subjectName: r.subject ? (r.equipment_name ?? r.subject) : null,
          siteId: r.site_id,
          siteName: r.site_name,
          companyName: r.company_name,
          stillOpen: r.status !== 'cleared',
        }));
      let outboxId: number | null = null;
      if (person && held.length > 0) {
        const mail = morningSummaryMail(held, person, this.config.publicUrl);
        const queued = await enqueueMail(trx, {
          dedupeKey: `alert-summary:${userId}:${Math.min(...ids)}`,
          to: person.email,
          subject: mail.subject,
          text: mail.text,
          html: mail.html,
          category: 'summary',
          userId,
        });
        outboxId = queued.id;
      }
      await trx
        .updateTable('alert_digest_items')
        .set({ summarised_at: now, outbox_id: outboxId })
        .where('id', 'in', ids)
        .execute();
      return outboxId !== null;
    });
  }
}
