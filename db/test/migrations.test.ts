import { sql } from 'kysely';
import { describe, expect, it } from 'vitest';
import { createDb } from '../src/database.js';
import { migrations } from '../src/migrations/index.js';
import { migrateDown, migrateToLatest, migrateToNothing } from '../src/migrate.js';
import { useTestDatabase } from '../src/testing.js';

const test = useTestDatabase('migr');

async function tableNames(url: string): Promise<string[]> {
  const db = createDb(url, { max: 1 });
  try {
    const { rows } = await sql<{ name: string }>`
      select tablename as name from pg_tables where schemaname = 'public' and tablename not like 'kysely_%'
      order by 1`.execute(db);
    return rows.map((r) => r.name);
  } finally {
    await db.destroy();
  }
}

describe('migrations', () => {
  it('the template database is at the latest migration', async () => {
    const { rows } = await sql<{
      name: string;
    }>`select name from kysely_migration order by name`.execute(test.db);
    expect(rows.map((r) => r.name)).toEqual(Object.keys(migrations).sort());
  });

  it('run all the way down to an empty schema and back up again', async () => {
    const before = await tableNames(test.url);
    expect(before).toContain('readings');
    expect(before).toContain('alerts');

    const reverted = await migrateToNothing(test.db);
    expect(reverted.sort()).toEqual(Object.keys(migrations).sort());
    expect(await tableNames(test.url)).toEqual([]);

    const applied = await migrateToLatest(test.db);
    expect(applied).toEqual(Object.keys(migrations).sort());
    expect(await tableNames(test.url)).toEqual(before);
  });

  it('reverting the latest migration one step and re-applying it is clean', async () => {
    const latest = Object.keys(migrations).sort().at(-1);
    expect(await migrateDown(test.db)).toEqual([latest]);
    expect(await migrateToLatest(test.db)).toEqual([latest]);
  });
});
