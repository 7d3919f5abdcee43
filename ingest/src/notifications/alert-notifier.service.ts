import {
  Inject,
  Injectable,
  type BeforeApplicationShutdown,
  type OnApplicationBootstrap,
} from '@nestjs/common';
import type { AlertKind, AlertSeverity, Evidence } from '@wellkept/core';
import { enqueueMail } from '@wellkept/db';
import { sql } from 'kysely';
import type { Logger } from 'pino';
import { DATABASE, type Database } from '../database/database.js';
import { LOGGER } from '../logging/logger.js';
import { CLOCK, type Clock } from './clock.js';
import { MAIL_CONFIG, type MailConfig } from './mail-config.js';
import { alertMail, type AlertMailContext } from './mail/alert-mail.js';
import { OutboxSenderService } from './outbox-sender.service.js';
import { quietHoursAt } from './quiet-hours.js';
import { RecipientsRepository } from './recipients.repository.js';
import { SiteDayFiguresRepository } from './site-day-figures.repository.js';

/** Events handled per transaction. */
const BATCH = 20;
/** How often events written elsewhere (a person clearing through the API) are picked up, ms. */
const SWEEP_EVERY_MS = 10_000;

interface PendingEvent {
  id: number;
  alert_id: string;
  site_id: string;
  event: 'opened' | 'acknowledged' | 'cleared' | 'reopened';
  at: Date;
  user_id: string | null;
  note: string | null;
  evidence: unknown;
  kind: AlertKind;
  subject: string;
  severity: AlertSeverity;
  summary: string;
  alert_evidence: unknown;
  opened_at: Date;
  site_name: string;
  company_name: string;
  cleared_by_name: string | null;
}

/**
 * Turns alert history into mail. Every `alert_events` row not yet notified (whoever wrote it:
 * the rules here, or a person clearing an alert through the API) is handled once, in a
 * transaction that writes its outbox rows (or, for people in their quiet hours, digest items for
 * the morning summary) and marks the event notified. A crash before the commit leaves the event
 * to the next sweep; the outbox's dedupe key (`alert:<event>:<user>`) keeps a retried sweep from
 * writing a message twice. Acknowledgements are history only and send nothing.
 */
@Injectable()
export class AlertNotifier implements OnApplicationBootstrap, BeforeApplicationShutdown {
  private timer: NodeJS.Timeout | undefined;
  private running: Promise<number> | null = null;
  private again = false;

  constructor(
    @Inject(DATABASE) private readonly db: Database,
    private readonly recipients: RecipientsRepository,
    private readonly figures: SiteDayFiguresRepository,
    private readonly sender: OutboxSenderService,
    @Inject(MAIL_CONFIG) private readonly config: MailConfig,
    @Inject(CLOCK) private readonly clock: Clock,
    @Inject(LOGGER) private readonly logger: Logger,
  ) {}

  onApplicationBootstrap(): void {
    this.timer = setInterval(() => void this.sweep().catch(() => undefined), SWEEP_EVERY_MS);
    this.timer.unref();
    void this.sweep().catch(() => undefined);
  }

  async beforeApplicationShutdown(): Promise<void> {
    clearInterval(this.timer);
    await this.running?.catch(() => undefined);
  }

  /** Handles every pending event; concurrent calls share the run (and run once more after). */
  sweep(): Promise<number> {
    if (this.running) {
      this.again = true;
      return this.running;
    }
    const run = (async () => {
      let total = 0;
      try {
        do {
          this.again = false;
          for (;;) {
            const { events, mails } = await this.handleBatch();
            total += mails;
            if (events < BATCH) break;
          }
        } while (this.again);
      } catch (error) {
        this.logger.error({ err: error }, 'alert notifier sweep failed; will retry');
        throw error;
      } finally {
        this.running = null;
      }
      if (total > 0) void this.sender.trigger();
      return total;
    })();
    this.running = run;
    return run;
  }

  private async handleBatch(): Promise<{ events: number; mails: number }> {
    return this.db.transaction().execute(async (trx) => {
      const { rows } = await sql<PendingEvent>`
        select e.id, e.alert_id, e.site_id, e.event, e.at, e.user_id, e.note, e.evidence,
               a.kind, a.subject, a.severity, a.summary, a.evidence as alert_evidence, a.opened_at,
               s.name as site_name, c.name as company_name, u.name as cleared_by_name
        from alert_events e
        join alerts a on a.id = e.alert_id
        join sites s on s.id = e.site_id
        join companies c on c.id = s.company_id
        left join users u on u.id = e.user_id
        where e.notified_at is null
        order by e.id
        limit ${BATCH}
        for update of e skip locked`.execute(trx);
      let mails = 0;
      const now = this.clock.now();
      for (const e of rows) {
        if (e.event !== 'acknowledged') mails += await this.notify(trx, e, now);
      }
      if (rows.length > 0) {
        await trx
          .updateTable('alert_events')
          .set({ notified_at: now })
          .where(
            'id',
            'in',
            rows.map((r) => r.id),
          )
          .execute();
      }
      return { events: rows.length, mails };
    });
  }

  private async notify(trx: Database, e: PendingEvent, now: Date): Promise<number> {
    const change = e.event === 'cleared' ? 'clear' : 'open';
    const people = await this.recipients.forAlertEvent(trx, e.site_id, e.kind, change);
    if (people.length === 0) return 0;
    const installers = people.some((p) => p.role !== 'owner');
    const ctx: AlertMailContext = {
      event: e.event as AlertMailContext['event'],
      at: e.at,
      clearedByName: e.event === 'cleared' ? e.cleared_by_name : null,
      note: e.note,
      alert: {
        id: e.alert_id,
        kind: e.kind,
        subject: e.subject,
        subjectName: await this.subjectName(trx, e.site_id, e.kind, e.subject),
        severity: e.severity,
        summary: e.event === 'cleared' && e.note ? e.note : e.summary,
        openedAt: e.opened_at,
        evidence: asEvidence(e.evidence) ?? asEvidence(e.alert_evidence),
      },
      site: { id: e.site_id, name: e.site_name, companyName: e.company_name },
      figures: installers ? await this.figures.figures(trx, e.site_id, e.at) : null,
      publicUrl: this.config.publicUrl,
    };
    let mails = 0;
    for (const person of people) {
      const quiet = quietHoursAt(
        now.getTime() / 1000,
        person.quietHours ? { ...person.quietHours, timeZone: person.timeZone } : null,
      );
      if (quiet.quiet) {
        await trx
          .insertInto('alert_digest_items')
          .values({
            user_id: person.userId,
            alert_event_id: e.id,
            due_at: new Date(quiet.endsAt * 1000),
          })
          .onConflict((oc) => oc.columns(['user_id', 'alert_event_id']).doNothing())
          .execute();
        continue;
      }
      const mail = alertMail(ctx, { ...person });
      const { created } = await enqueueMail(trx, {
        dedupeKey: `alert:${e.id}:${person.userId}`,
        to: person.email,
        subject: mail.subject,
        text: mail.text,
        html: mail.html,
        category: 'alert',
        userId: person.userId,
        alertEventId: e.id,
      });
      if (created) mails += 1;
    }
    return mails;
  }

  /** The equipment's own name for subjects that are a pump, tank, float switch or gateway. */
  private async subjectName(
    trx: Database,
    siteId: string,
    kind: AlertKind,
    subject: string,
  ): Promise<string | null> {
    if (!subject) return null;
    const table =
      kind === 'dry_run' || kind === 'short_cycling'
        ? 'pumps'
        : kind === 'water_low'
          ? 'tanks'
          : kind === 'float_stuck'
            ? 'float_switches'
            : null;
    if (!table) return subject;
    const row = await trx
      .selectFrom(table)
      .select('name')
      .where('site_id', '=', siteId)
      .where('key', '=', subject)
      .executeTakeFirst();
    return row?.name ?? subject;
  }
}

function asEvidence(value: unknown): Evidence | null {
  if (!value || typeof value !== 'object') return null;
  const v = value as Partial<Evidence>;
  return Array.isArray(v.observed) && Array.isArray(v.thresholds) ? (v as Evidence) : null;
}
