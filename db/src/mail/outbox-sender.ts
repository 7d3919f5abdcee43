import nodemailer, { type Transporter } from 'nodemailer';
import type { Database } from '../database.js';
import {
  claimDueMail,
  hasMailWaitingForServer,
  markMailFailed,
  markMailSent,
  releaseMailWaitingForServer,
} from './outbox.js';

/** How to reach the SMTP server. */
export interface SmtpSettings {
  host: string;
  port: number;
  secure?: boolean;
  user?: string;
  password?: string;
  /** The From header, e.g. `Wellkept <alerts@wellkept.example>`. */
  from: string;
}

export interface OutboxSenderOptions {
  /** Messages claimed per round (default 20). */
  batchSize?: number;
  /** Attempts before a message is left for a person to look at (default 8). */
  maxAttempts?: number;
  /** Seconds a claim holds before another sender may retry it (default 120). */
  leaseSeconds?: number;
  /** Seconds between periodic rounds once started (default 15). */
  intervalSeconds?: number;
  /** Where to report failures; never receives message bodies or credentials. */
  log?: (message: string) => void;
  /** Seconds to wait after the n-th failed attempt (default {@link retryDelaySeconds}). */
  retryDelay?: (attempts: number) => number;
}

/** The Message-ID of an outbox row: `<outbox-<id>@<domain of the From address>>`. */
export function outboxMessageId(id: number, from: string): string {
  const domain = /@([A-Za-z0-9.-]+)>?\s*$/.exec(from)?.[1] ?? 'wellkept.invalid';
  return `<outbox-${id}@${domain}>`;
}

/** Seconds to wait after the n-th failed attempt: 30 s doubling, at most one hour. */
export function retryDelaySeconds(attempts: number): number {
  return Math.min(30 * 2 ** Math.max(0, attempts - 1), 3600);
}

/**
 * Whether a send failed because the SMTP server could not be reached at all (refused, timed
 * out, dropped, name not resolved, or "421 service not available"), rather than answering and
 * refusing this message. Only such failures are retried early when the server comes back.
 */
export function isServerUnreachable(error: unknown): boolean {
  const e = error as { code?: unknown; responseCode?: unknown } | null;
  const codes = ['ECONNECTION', 'ETIMEDOUT', 'ESOCKET', 'EDNS', 'ECONNREFUSED', 'ECONNRESET'];
  return typeof e?.code === 'string' && codes.includes(e.code) ? true : e?.responseCode === 421;
}

/**
 * Sends what is due in `email_outbox` through nodemailer. Framework-free so the API (invites,
 * password resets) and the rules module (alert mail) share it. Each message is marked sent
 * once; failures are retried with backoff. `trigger()` runs a round soon (after an enqueue);
 * `start()` also runs rounds on a timer so held and retried messages go out.
 */
export class OutboxSender {
  private readonly transporter: Transporter;
  private readonly options: Required<Omit<OutboxSenderOptions, 'log' | 'retryDelay'>> & {
    log: (m: string) => void;
    retryDelay: (attempts: number) => number;
  };
  private timer: NodeJS.Timeout | undefined;
  private running: Promise<void> | undefined;
  private again = false;
  private stopped = false;
  private lastProbeAt = 0;

  constructor(
    private readonly db: Database,
    private readonly smtp: SmtpSettings,
    options: OutboxSenderOptions = {},
  ) {
    this.transporter = nodemailer.createTransport({
      host: smtp.host,
      port: smtp.port,
      secure: smtp.secure ?? false,
      auth: smtp.user ? { user: smtp.user, pass: smtp.password ?? '' } : undefined,
      connectionTimeout: 10_000,
      greetingTimeout: 10_000,
      socketTimeout: 20_000,
    });
    this.options = {
      batchSize: options.batchSize ?? 20,
      maxAttempts: options.maxAttempts ?? 8,
      leaseSeconds: options.leaseSeconds ?? 120,
      intervalSeconds: options.intervalSeconds ?? 15,
      log: options.log ?? ((m) => console.error(m)),
      retryDelay: options.retryDelay ?? retryDelaySeconds,
    };
  }

  /** Sends every due message (in rounds) and resolves with the counts. */
  async sendDue(): Promise<{ sent: number; failed: number }> {
    let sent = 0;
    let failed = 0;
    for (;;) {
      const batch = await claimDueMail(this.db, {
        limit: this.options.batchSize,
        leaseSeconds: this.options.leaseSeconds,
        maxAttempts: this.options.maxAttempts,
      });
      if (batch.length === 0) return { sent, failed };
      for (const mail of batch) {
        try {
          const info = await this.transporter.sendMail({
            // One Message-ID per outbox row, the same on every attempt: a retry after a send
            // whose answer was lost (SMTP or process died between DATA and markMailSent)
            // carries the same id, so mail systems and the fault runs can tell it is a repeat.
            messageId: outboxMessageId(mail.id, this.smtp.from),
            from: this.smtp.from,
            to: mail.to,
            subject: mail.subject,
            text: mail.text,
            html: mail.html ?? undefined,
          });
          await markMailSent(this.db, mail.id, String(info.messageId ?? ''));
          // The server answers: what waited for it need not wait out its backoff.
          if (sent++ === 0) await releaseMailWaitingForServer(this.db);
        } catch (error) {
          failed++;
          const reason = error instanceof Error ? error.message : String(error);
          this.options.log(`outbox: message ${mail.id} attempt ${mail.attempts} failed: ${reason}`);
          await markMailFailed(
            this.db,
            mail.id,
            reason,
            this.options.retryDelay(mail.attempts),
            isServerUnreachable(error),
          );
        }
      }
      if (this.stopped) return { sent, failed };
    }
  }

  /**
   * While messages wait because the server could not be reached, asks the server (an SMTP
   * greeting and EHLO, nothing sent) at most once per interval; once it answers, those messages
   * are made due now. Without this, mail held through an outage of an hour would wait up to
   * another hour of backoff after the server returned. Returns whether any were released.
   */
  private async releaseIfServerBack(): Promise<boolean> {
    const now = Date.now();
    if (now - this.lastProbeAt < this.options.intervalSeconds * 1000) return false;
    if (!(await hasMailWaitingForServer(this.db, this.options.maxAttempts))) return false;
    this.lastProbeAt = now;
    try {
      await this.transporter.verify();
    } catch {
      return false; // still down: the backoff stands
    }
    return (await releaseMailWaitingForServer(this.db)) > 0;
  }

  /** Runs a round soon; rounds never overlap within one sender. */
  trigger(): Promise<void> {
    if (this.stopped) return Promise.resolve();
    if (this.running) {
      this.again = true;
      return this.running;
    }
    this.running = (async () => {
      try {
        do {
          this.again = false;
          await this.sendDue();
          if (!this.stopped && (await this.releaseIfServerBack())) this.again = true;
        } while (this.again && !this.stopped);
      } catch (error) {
        this.options.log(`outbox: round failed: ${error instanceof Error ? error.message : error}`);
      } finally {
        this.running = undefined;
      }
    })();
    return this.running;
  }

  /** Starts periodic rounds. */
  start(): void {
    if (this.timer || this.stopped) return;
    this.timer = setInterval(() => void this.trigger(), this.options.intervalSeconds * 1000);
    this.timer.unref();
    void this.trigger();
  }

  /** Stops the timer and waits for a round in progress. */
  async stop(): Promise<void> {
    this.stopped = true;
    if (this.timer) clearInterval(this.timer);
    this.timer = undefined;
    await this.running;
    this.transporter.close();
  }
}
