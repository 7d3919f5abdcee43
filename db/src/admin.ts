import pg from 'pg';
import { withDatabaseName } from './config.js';

function quoteIdent(name: string): string {
  return `"${name.replace(/"/g, '""')}"`;
}

async function withMaintenance<T>(url: string, fn: (c: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: withDatabaseName(url, 'postgres') });
  await client.connect();
  try {
    return await fn(client);
  } finally {
    await client.end();
  }
}

/** Creates the URL's database when it does not exist (optionally from a template). */
export async function ensureDatabase(url: string, template?: string): Promise<boolean> {
  const name = decodeURIComponent(new URL(url).pathname.slice(1));
  return withMaintenance(url, async (c) => {
    const found = await c.query('select 1 from pg_database where datname = $1', [name]);
    if (found.rowCount) return false;
    await c.query(
      `create database ${quoteIdent(name)}${template ? ` template ${quoteIdent(template)}` : ''}`,
    );
    return true;
  });
}

/** Drops the URL's database (closing other connections to it first). */
export async function dropDatabase(url: string): Promise<void> {
  const name = decodeURIComponent(new URL(url).pathname.slice(1));
  await withMaintenance(url, async (c) => {
    await c.query(`drop database if exists ${quoteIdent(name)} with (force)`);
  });
}
