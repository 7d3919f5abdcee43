import { defineConfig } from 'vitest/config';

// One Vitest run covers every workspace (each is a "project" with its own vitest.config.ts).
// The global setup starts a throw-away PostgreSQL cluster for the whole run, migrates a
// template database once, and stops the cluster afterwards (see db/src/testing/).
export default defineConfig({
  test: {
    projects: [
      'db',
      'core',
      'ingest',
      'ingest/vitest.system.config.ts',
      'api',
      'simulator',
      'dashboard',
    ],
    globalSetup: ['./db/src/testing/global-setup.ts'],
  },
});
