import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { NestFastifyApplication } from '@nestjs/platform-fastify';
import { createApp } from '../../src/app.js';
import type { ApiConfig } from '../../src/config/api-config.js';

export interface TestApp {
  app: NestFastifyApplication;
  config: Partial<ApiConfig>;
  close(): Promise<void>;
}

/**
 * The real application (AppModule on Fastify) over a test database, with uploads in a fresh
 * temporary folder and mail to the given SMTP port (a mail catcher) or a closed port.
 */
export async function startTestApp(
  databaseUrl: string,
  overrides: Partial<ApiConfig> = {},
  onRoute?: (route: { method: string; url: string }) => void,
): Promise<TestApp> {
  const config: Partial<ApiConfig> = {
    databaseUrl,
    jwtSecret: 'test-secret-test-secret-test-secret-0123',
    publicUrl: 'http://dashboard.test',
    uploads: { dir: mkdtempSync(join(tmpdir(), 'wellkept-uploads-')), maxBytes: 2 * 1024 * 1024 },
    mail: { host: '127.0.0.1', port: 9, secure: false, from: 'Wellkept <test@wellkept.example>' },
    ...overrides,
  };
  const app = await createApp({ config, logLevels: ['error'], onRoute });
  await app.init();
  await app.getHttpAdapter().getInstance().ready();
  return { app, config, close: () => app.close() };
}
