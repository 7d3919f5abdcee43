/*
 * What several ingest nodes need beyond the broker: the setting that selects shared mode, and
 * partition creation that two nodes starting at the same moment can both run.
 */
import { createDb, ensureTimePartitions } from '@wellkept/db';
import { useTestDatabase } from '@wellkept/db/testing';
import { sql } from 'kysely';
import { describe, expect, it } from 'vitest';
import { redisOptions } from '../../src/broker/shared-broker-state.js';
import { readIngestConfig } from '../../src/config/ingest-config.js';

const test = useTestDatabase('shared');
const base = { DATABASE_URL: 'postgres://u:p@127.0.0.1:5432/wellkept' };

describe('INGEST_BROKER_MODE', () => {
  it('defaults to the embedded single-node broker (no Redis)', () => {
    expect(readIngestConfig(base).broker).toEqual({ mode: 'single' });
  });

  it('selects shared mode with the Redis URL', () => {
    const config = readIngestConfig({
      ...base,
      INGEST_BROKER_MODE: 'shared',
      REDIS_URL: 'redis://:s%40cret@10.0.0.5:6380/2',
    });
    expect(config.broker).toEqual({
      mode: 'shared',
      redisUrl: 'redis://:s%40cret@10.0.0.5:6380/2',
    });
    expect(redisOptions('redis://:s%40cret@10.0.0.5:6380/2')).toMatchObject({
      host: '10.0.0.5',
      port: 6380,
      password: 's@cret',
      db: 2,
      tls: undefined,
    });
    expect(redisOptions('rediss://cache.internal').tls).toEqual({});
  });

  it('says what is missing or wrong', () => {
    expect(() => readIngestConfig({ ...base, INGEST_BROKER_MODE: 'shared' })).toThrow(
      /REDIS_URL: INGEST_BROKER_MODE=shared needs REDIS_URL/,
    );
    expect(() => readIngestConfig({ ...base, INGEST_BROKER_MODE: 'cluster' })).toThrow(
      /INGEST_BROKER_MODE/,
    );
    expect(() =>
      readIngestConfig({ ...base, INGEST_BROKER_MODE: 'shared', REDIS_URL: 'http://x' }),
    ).toThrow(/REDIS_URL: must be a redis:\/\/ or rediss:\/\/ URL/);
  });
});

describe('partitions created by nodes starting together', () => {
  it('creates each missing partition once while several connections ask at the same moment', async () => {
    // A range no other test touches: days in 2031.
    const from = new Date('2031-03-01T00:00:00Z');
    const to = new Date('2031-03-21T00:00:00Z');
    const nodes = Array.from({ length: 6 }, () => createDb(test.url, { max: 1 }));
    try {
      const created = await Promise.all(
        nodes.map((db) => ensureTimePartitions(db, 'readings', from, to)),
      );
      expect(created.reduce((a, b) => a + b, 0)).toBe(20);
      const { rows } = await sql<{ n: number }>`
        select count(*)::int as n from pg_inherits i join pg_class c on c.oid = i.inhrelid
        where i.inhparent = 'readings'::regclass and c.relname like 'readings_p203103%'`.execute(
        test.db,
      );
      expect(rows[0]!.n).toBe(20);
    } finally {
      await Promise.all(nodes.map((db) => db.destroy()));
    }
  });
});
