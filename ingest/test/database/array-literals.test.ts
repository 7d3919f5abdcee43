import { useTestDatabase } from '@wellkept/db/testing';
import { sql } from 'kysely';
import { describe, expect, it } from 'vitest';
import {
  booleanArrayLiteral,
  numberArrayLiteral,
  textArrayLiteral,
} from '../../src/database/array-literals.js';

const database = useTestDatabase('ingest_array_literals');

/** Reads an array literal back through PostgreSQL's own parser, element by element. */
async function readBack<T>(
  literal: string,
  type: 'float8' | 'int' | 'text' | 'uuid' | 'bool' | 'timestamptz',
): Promise<T[]> {
  const { rows } = await sql<{ v: T }>`
    select v from unnest(${literal}::${sql.raw(type)}[]) with ordinality as u(v, i) order by i`.execute(
    database.db,
  );
  return rows.map((r) => r.v);
}

describe('array literals for fleet-sized parameters', () => {
  it('reads numbers back as the very same doubles, nulls included', async () => {
    const values = [
      1796319123.456789,
      0.1 + 0.2,
      -0.000123,
      1e21,
      5e-324,
      1.7976931348623157e308,
      42,
      null,
      -7.5,
    ];
    const back = await readBack<number | null>(numberArrayLiteral(values), 'float8');
    expect(back).toEqual(values);
    expect(Object.is(back[0], values[0])).toBe(true);
  });

  it('reads integers back', async () => {
    expect(await readBack<number>(numberArrayLiteral([1, 2147483647, 0]), 'int')).toEqual([
      1, 2147483647, 0,
    ]);
  });

  it('reads strings back unchanged, whatever punctuation they hold', async () => {
    const values = [
      'absorption',
      '',
      'NULL',
      null,
      'with "quotes" and \\ backslashes \\"',
      '{braces}, commas, and spaces ',
      'ünïcødé ✓',
      '\\',
      '"',
    ];
    expect(await readBack<string | null>(textArrayLiteral(values), 'text')).toEqual(values);
  });

  it('reads uuids back', async () => {
    const ids = ['0b9f6a52-2f0e-4c0f-9a1e-3c1d2b4a5e6f', '00000000-0000-0000-0000-000000000001'];
    expect(await readBack<string>(textArrayLiteral(ids), 'uuid')).toEqual(ids);
  });

  it('reads booleans back, nulls included', async () => {
    const values = [true, false, null, true];
    expect(await readBack<boolean | null>(booleanArrayLiteral(values), 'bool')).toEqual(values);
  });

  it('reads ISO times back as the same instants', async () => {
    const times = ['2026-12-03T20:15:01.123Z', '2027-01-01T00:00:00.000Z'];
    const back = await readBack<Date>(textArrayLiteral(times), 'timestamptz');
    expect(back.map((d) => d.toISOString())).toEqual(times);
  });

  it('gives empty arrays for no values', async () => {
    expect(await readBack<number>(numberArrayLiteral([]), 'float8')).toEqual([]);
    expect(await readBack<string>(textArrayLiteral([]), 'text')).toEqual([]);
    expect(await readBack<boolean>(booleanArrayLiteral([]), 'bool')).toEqual([]);
  });
});
