import { randomBytes } from 'node:crypto';
import { afterAll, beforeAll } from 'vitest';
import { dropDatabase, ensureDatabase } from '../admin.js';
import { withDatabaseName } from '../config.js';
import { createDb, type Database } from '../database.js';
import { TEMPLATE_DATABASE } from './global-setup.js';

export interface TestDatabase {
  url: string;
  db: Database;
  drop(): Promise<void>;
}

/** The throw-away cluster's URL (set by the global setup of the test run). */
export function testServerUrl(): string {
  const url = process.env.WELLKEPT_TEST_DATABASE_URL;
  if (!url) {
    throw new Error(
      'WELLKEPT_TEST_DATABASE_URL is not set: run tests through `npm test` (or vitest from the repo root)',
    );
  }
  return url;
}

/**
 * A fresh, migrated database for one test file, copied from the template the global setup
 * migrated once (CREATE DATABASE ... TEMPLATE takes a few tens of milliseconds).
 */
export async function createTestDatabase(prefix = 't'): Promise<TestDatabase> {
  const url = withDatabaseName(testServerUrl(), `${prefix}_${randomBytes(6).toString('hex')}`);
  for (let attempt = 0; ; attempt++) {
    try {
      await ensureDatabase(url, TEMPLATE_DATABASE);
      break;
    } catch (error) {
      // Two files copying the template at the same instant can collide; try again shortly.
      if (attempt >= 20 || !String(error).includes('is being accessed by other users')) throw error;
      await new Promise((r) => setTimeout(r, 100 + Math.random() * 200));
    }
  }
  const db = createDb(url, { max: 5, applicationName: 'wellkept-test' });
  return {
    url,
    db,
    async drop() {
      await db.destroy();
      await dropDatabase(url);
    },
  };
}

/** Registers a per-file test database with Vitest's hooks; read `.db`/`.url` inside tests. */
export function useTestDatabase(prefix?: string): { readonly db: Database; readonly url: string } {
  let current: TestDatabase | undefined;
  beforeAll(async () => {
    current = await createTestDatabase(prefix);
  });
  afterAll(async () => {
    await current?.drop();
  });
  return {
    get db() {
      if (!current) throw new Error('test database not ready (use it inside tests or hooks)');
      return current.db;
    },
    get url() {
      if (!current) throw new Error('test database not ready (use it inside tests or hooks)');
      return current.url;
    },
  };
}
