import { resolve } from 'node:path';
import { dataRoot, readDatabaseConfig } from '@wellkept/db';
import { z } from 'zod';

/** A development-only signing key, so `npm start` works without setup. Refused in production. */
const DEVELOPMENT_JWT_SECRET = 'wellkept-development-only-session-signing-key-0001';

const apiEnv = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  API_PORT: z.coerce.number().int().min(1).max(65535).default(3000),
  API_HOST: z.string().min(1).default('127.0.0.1'),
  PUBLIC_URL: z.string().url().default('http://127.0.0.1:5173'),
  JWT_SECRET: z.string().min(32, 'must be at least 32 characters').optional(),
  SMTP_HOST: z.string().min(1).default('127.0.0.1'),
  SMTP_PORT: z.coerce.number().int().min(1).max(65535).default(1025),
  SMTP_SECURE: z
    .enum(['true', 'false'])
    .default('false')
    .transform((v) => v === 'true'),
  SMTP_USER: z.string().optional(),
  SMTP_PASSWORD: z.string().optional(),
  MAIL_FROM: z.string().min(3).default('Wellkept <alerts@wellkept.example>'),
  UPLOAD_MAX_BYTES: z.coerce
    .number()
    .int()
    .min(1024)
    .default(15 * 1024 * 1024),
});

export interface MailSettings {
  host: string;
  port: number;
  secure: boolean;
  user?: string;
  password?: string;
  from: string;
}

/** Everything the API reads from its environment, validated once at start-up. */
export interface ApiConfig {
  production: boolean;
  port: number;
  host: string;
  /** Where people reach the dashboard; links in e-mails point here. */
  publicUrl: string;
  databaseUrl: string;
  jwtSecret: string;
  /** Session cookies carry `Secure` in production (HTTPS); development runs on plain HTTP. */
  secureCookies: boolean;
  accessTokenTtlSeconds: number;
  refreshTokenTtlSeconds: number;
  invitationTtlSeconds: number;
  passwordResetTtlSeconds: number;
  signInLimits: SignInLimits;
  mail: MailSettings;
  uploads: { dir: string; maxBytes: number };
}

export interface SignInLimits {
  /** Failed attempts per account inside the window before the account is paused. */
  perAccount: number;
  /** Failed attempts per address (IP) inside the window. */
  perAddress: number;
  windowSeconds: number;
}

export const API_CONFIG = Symbol('API_CONFIG');

export function readApiConfig(env: NodeJS.ProcessEnv = process.env): ApiConfig {
  const parsed = apiEnv.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`);
    throw new Error(`Invalid API settings in the environment:\n${lines.join('\n')}`);
  }
  const e = parsed.data;
  const production = e.NODE_ENV === 'production';
  if (production && !e.JWT_SECRET) {
    throw new Error(
      'Invalid API settings in the environment:\n  JWT_SECRET: required in production',
    );
  }
  return {
    production,
    port: e.API_PORT,
    host: e.API_HOST,
    publicUrl: e.PUBLIC_URL.replace(/\/+$/, ''),
    databaseUrl: readDatabaseConfig(env).url,
    jwtSecret: e.JWT_SECRET ?? DEVELOPMENT_JWT_SECRET,
    secureCookies: production,
    accessTokenTtlSeconds: 15 * 60,
    refreshTokenTtlSeconds: 30 * 24 * 3600,
    invitationTtlSeconds: 7 * 24 * 3600,
    passwordResetTtlSeconds: 3600,
    signInLimits: { perAccount: 5, perAddress: 20, windowSeconds: 15 * 60 },
    mail: {
      host: e.SMTP_HOST,
      port: e.SMTP_PORT,
      secure: e.SMTP_SECURE,
      user: e.SMTP_USER,
      password: e.SMTP_PASSWORD,
      from: e.MAIL_FROM,
    },
    uploads: { dir: resolve(dataRoot(), 'uploads'), maxBytes: e.UPLOAD_MAX_BYTES },
  };
}
