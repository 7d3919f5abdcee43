import { freePort } from '@wellkept/db';
import { startMailCatcher, type MailCatcher } from '@wellkept/db/testing';

/** A caught message with the header the exactly-once check keys on. */
export interface CaughtMessage {
  messageId: string;
  to: string[];
  subject: string;
}

interface MaildevEmail {
  subject?: string;
  to?: { address: string }[];
  headers?: Record<string, string>;
}

/**
 * The SMTP catcher (maildev, in this process) on fixed ports, so it can be stopped and started
 * again where the services expect it. maildev keeps messages in memory only, so what it caught
 * is copied out before each stop: `all()` is every message received over every life.
 */
export class RestartableCatcher {
  private current: MailCatcher | undefined;
  private readonly earlier: CaughtMessage[] = [];

  private constructor(
    readonly smtpPort: number,
    private readonly webPort: number,
  ) {}

  static async start(): Promise<RestartableCatcher> {
    const catcher = new RestartableCatcher(await freePort(), await freePort());
    await catcher.resume();
    return catcher;
  }

  get up(): boolean {
    return Boolean(this.current);
  }

  async resume(): Promise<void> {
    if (this.current) return;
    this.current = await startMailCatcher({ smtpPort: this.smtpPort, webPort: this.webPort });
  }

  async halt(): Promise<void> {
    const current = this.current;
    if (!current) return;
    this.earlier.push(...(await this.fetchCurrent()));
    this.current = undefined;
    await current.stop();
  }

  async all(): Promise<CaughtMessage[]> {
    return [...this.earlier, ...(this.current ? await this.fetchCurrent() : [])];
  }

  /** maildev's REST listing, with the Message-ID header (the testing helper leaves it out). */
  private async fetchCurrent(): Promise<CaughtMessage[]> {
    const res = await fetch(`http://127.0.0.1:${this.webPort}/api/email`);
    if (!res.ok) throw new Error(`mail catcher answered ${res.status}`);
    const list = (await res.json()) as MaildevEmail[];
    return list.map((m) => ({
      messageId: m.headers?.['message-id'] ?? '',
      to: (m.to ?? []).map((a) => a.address),
      subject: m.subject ?? '',
    }));
  }
}
