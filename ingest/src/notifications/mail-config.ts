import type { SmtpSettings } from '@wellkept/db';
import { z } from 'zod';

/**
 * Outgoing mail settings of the ingest service (alert mail and morning summaries), from the
 * same variables the API reads, so one `.env` serves both.
 */
const mailEnv = z
  .object({
    SMTP_HOST: z.string().min(1).default('127.0.0.1'),
    SMTP_PORT: z.coerce.number().int().min(1).max(65535).default(1025),
    SMTP_SECURE: z
      .enum(['true', 'false'], { message: "must be 'true' or 'false'" })
      .default('false')
      .transform((v) => v === 'true'),
    SMTP_USER: z.string().min(1).optional(),
    SMTP_PASSWORD: z.string().optional(),
    MAIL_FROM: z.string().min(3).default('Wellkept <alerts@wellkept.example>'),
    /** Where people open the dashboard; links in alert mail point here. */
    PUBLIC_URL: z.string().url().default('http://127.0.0.1:5173'),
    /** How often the outbox is swept for due and retried messages, seconds. */
    MAIL_SEND_INTERVAL_S: z.coerce.number().min(0.05).max(3600).default(15),
    /** Attempts before a message is left for a person; with the backoff capped at an hour, 48
     *  attempts ride out about two days of SMTP outage. */
    MAIL_MAX_ATTEMPTS: z.coerce.number().int().min(1).max(1000).default(48),
    /** Wait before the first retry of a failed send, seconds; it doubles per attempt, capped at
     *  an hour. Shorter values suit tests and fault runs. */
    MAIL_RETRY_FIRST_S: z.coerce.number().min(0.1).max(3600).default(30),
  })
  .refine((e) => !e.SMTP_PASSWORD || Boolean(e.SMTP_USER), {
    message: 'SMTP_PASSWORD is set but SMTP_USER is not',
    path: ['SMTP_USER'],
  });

/** The validated mail settings. */
export interface MailConfig {
  smtp: SmtpSettings;
  /** Dashboard address without a trailing slash, e.g. `https://watch.example.net`. */
  publicUrl: string;
  sendIntervalSeconds: number;
  maxAttempts: number;
  /** Seconds before retry n (n = attempts so far); the outbox default when absent. */
  retryDelay?: (attempts: number) => number;
}

/**
 * Reads and validates the mail settings once; a bad value stops the service with a message
 * naming the variable. The SMTP password is never part of an error message.
 */
export function readMailConfig(env: NodeJS.ProcessEnv = process.env): MailConfig {
  const parsed = mailEnv.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`);
    throw new Error(`Invalid mail settings in the environment:\n${lines.join('\n')}`);
  }
  const e = parsed.data;
  return {
    smtp: {
      host: e.SMTP_HOST,
      port: e.SMTP_PORT,
      secure: e.SMTP_SECURE,
      user: e.SMTP_USER,
      password: e.SMTP_PASSWORD,
      from: e.MAIL_FROM,
    },
    publicUrl: e.PUBLIC_URL.replace(/\/+$/, ''),
    sendIntervalSeconds: e.MAIL_SEND_INTERVAL_S,
    maxAttempts: e.MAIL_MAX_ATTEMPTS,
    retryDelay: (attempts) => Math.min(e.MAIL_RETRY_FIRST_S * 2 ** Math.max(0, attempts - 1), 3600),
  };
}

/** Injection token for {@link MailConfig}. */
export const MAIL_CONFIG = Symbol('MAIL_CONFIG');
