import { MailDev } from 'maildev';
import { freePort } from './global-setup.js';

/** A message as the catcher received it. */
export interface CaughtMail {
  id: string;
  subject: string;
  text: string;
  html: string;
  from: string[];
  to: string[];
  time: Date;
}

export interface MailCatcher {
  smtpPort: number;
  webPort: number;
  /** SMTP settings for an `OutboxSender` or the API's config. */
  smtp: { host: string; port: number; secure: false; from: string };
  /** Every message received so far, oldest first. */
  messages(): Promise<CaughtMail[]>;
  /** Waits for the first message matching the predicate (polls the REST API). */
  waitFor(match: (mail: CaughtMail) => boolean, timeoutMs?: number): Promise<CaughtMail>;
  /** Deletes every message. */
  clear(): Promise<void>;
  stop(): Promise<void>;
}

interface MaildevAddress {
  address: string;
  name?: string;
}

interface MaildevEmail {
  id: string;
  subject?: string;
  text?: string;
  html?: string;
  from?: MaildevAddress[];
  to?: MaildevAddress[];
  time: string;
}

/**
 * Starts maildev in this process on free loopback ports and reads messages back through its
 * REST API (`/api/email`), so tests see exactly what an SMTP client delivered.
 */
export async function startMailCatcher(
  ports: { smtpPort?: number; webPort?: number } = {},
): Promise<MailCatcher> {
  // Fixed ports let a test stop the catcher and start it again where senders expect it.
  const smtpPort = ports.smtpPort ?? (await freePort());
  const webPort = ports.webPort ?? (await freePort());
  const maildev = new MailDev({
    smtp: smtpPort,
    web: webPort,
    ip: '127.0.0.1',
    webIp: '127.0.0.1',
    silent: true,
  });
  await maildev.start();
  const base = `http://127.0.0.1:${webPort}/api`;

  async function messages(): Promise<CaughtMail[]> {
    const res = await fetch(`${base}/email`);
    if (!res.ok) throw new Error(`mail catcher answered ${res.status}`);
    const list = (await res.json()) as MaildevEmail[];
    return list
      .map((m) => ({
        id: m.id,
        subject: m.subject ?? '',
        text: m.text ?? '',
        html: m.html ?? '',
        from: (m.from ?? []).map((a) => a.address),
        to: (m.to ?? []).map((a) => a.address),
        time: new Date(m.time),
      }))
      .sort((a, b) => a.time.getTime() - b.time.getTime());
  }

  return {
    smtpPort,
    webPort,
    smtp: {
      host: '127.0.0.1',
      port: smtpPort,
      secure: false,
      from: 'Wellkept <test@wellkept.example>',
    },
    messages,
    async waitFor(match, timeoutMs = 10_000) {
      const deadline = Date.now() + timeoutMs;
      for (;;) {
        const found = (await messages()).find(match);
        if (found) return found;
        if (Date.now() > deadline) throw new Error('no matching e-mail arrived in time');
        await new Promise((r) => setTimeout(r, 50));
      }
    },
    async clear() {
      const res = await fetch(`${base}/email/all`, { method: 'DELETE' });
      if (!res.ok) throw new Error(`mail catcher answered ${res.status} to clear`);
    },
    async stop() {
      await maildev.stop();
    },
  };
}
