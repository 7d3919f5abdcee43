import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { NestFastifyApplication } from '@nestjs/platform-fastify';
import { freePort, startMailCatcher, type MailCatcher } from '@wellkept/db/testing';
import type { Database } from '@wellkept/db';
import { build, preview, type PreviewServer } from 'vite';
import { createApp } from '../../../api/src/app.js';
import { seedDemo, type SeedResult } from '../../../simulator/src/demo/seed.js';
import { seedHistory, seedOpenAlerts } from './history.js';

const viteConfig = fileURLToPath(new URL('../../vite.config.ts', import.meta.url));

export interface TestStack {
  api: NestFastifyApplication;
  apiPort: number;
  web: PreviewServer;
  url: string;
  seed: SeedResult;
  /** The SMTP catcher the API sends invitations and reset links to. */
  mail: MailCatcher;
  close(): Promise<void>;
}

/**
 * The real API (createApp, in this process) over the test's database with the demo company
 * and a day of simulated history, and the production build of the dashboard served by
 * `vite preview` with /api proxied to that API, and a mail catcher the API sends to.
 * Everything on free ports.
 */
export async function startTestStack(db: Database, databaseUrl: string): Promise<TestStack> {
  const seed = await seedDemo(db, join(mkdtempSync(join(tmpdir(), 'wk-demo-')), 'gateways.json'));
  await seedHistory(db, { days: 1, stepSeconds: 600 });
  await seedOpenAlerts(db);

  const mail = await startMailCatcher();
  const apiPort = await freePort();
  const api = await createApp({
    config: {
      databaseUrl,
      jwtSecret: 'dashboard-browser-tests-signing-key-0123456789',
      uploads: { dir: mkdtempSync(join(tmpdir(), 'wk-uploads-')), maxBytes: 5 * 1024 * 1024 },
      mail: { ...mail.smtp, from: 'Wellkept <test@wellkept.example>' },
    },
    logLevels: ['error'],
  });
  await api.listen({ port: apiPort, host: '127.0.0.1' });

  const outDir = mkdtempSync(join(tmpdir(), 'wk-dashboard-dist-'));
  process.env.API_PORT = String(apiPort);
  await build({ configFile: viteConfig, logLevel: 'warn', build: { outDir, sourcemap: false } });
  const webPort = await freePort();
  const web = await preview({
    configFile: viteConfig,
    logLevel: 'warn',
    build: { outDir },
    preview: { port: webPort, strictPort: true, host: '127.0.0.1' },
  });
  return {
    api,
    apiPort,
    web,
    url: `http://127.0.0.1:${webPort}`,
    seed,
    mail,
    close: async () => {
      await new Promise<void>((resolve) => web.httpServer.close(() => resolve()));
      await api.close();
      await mail.stop();
    },
  };
}
