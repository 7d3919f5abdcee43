import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import {
  DEFAULT_INGEST_HEAP_MB,
  ingestHeapMegabytes,
  ingestNodeArgs,
} from '../src/config/node-args.js';

/** The old-space limit V8 reports in a node process started with `args`, MB. */
function oldSpaceLimitMb(args: string[]): number {
  const r = spawnSync(
    process.execPath,
    [
      ...args,
      '-e',
      "const v8 = require('node:v8'); " +
        'process.stdout.write(String(v8.getHeapStatistics().heap_size_limit / 2 ** 20))',
    ],
    { encoding: 'utf8' },
  );
  expect(r.status, r.stderr).toBe(0);
  return Number(r.stdout);
}

describe('ingest node flags', () => {
  it('caps the heap at 384 MB unless INGEST_HEAP_MB says otherwise', () => {
    expect(ingestHeapMegabytes({})).toBe(DEFAULT_INGEST_HEAP_MB);
    expect(ingestHeapMegabytes({ INGEST_HEAP_MB: '1024' })).toBe(1024);
    expect(ingestNodeArgs({ INGEST_HEAP_MB: '512' })).toEqual(['--max-old-space-size=512']);
  });

  it('refuses a cap that is not a whole number of megabytes, or too small, saying why', () => {
    expect(() => ingestHeapMegabytes({ INGEST_HEAP_MB: 'lots' })).toThrow(
      'INGEST_HEAP_MB must be a whole number of megabytes, at least 128 (got "lots")',
    );
    expect(() => ingestHeapMegabytes({ INGEST_HEAP_MB: '64' })).toThrow('at least 128');
    expect(() => ingestHeapMegabytes({ INGEST_HEAP_MB: '300.5' })).toThrow('whole number');
  });

  it('gives a node process the heap limit it names (the default is several GB here)', () => {
    const capped = oldSpaceLimitMb(ingestNodeArgs({ INGEST_HEAP_MB: '256' }));
    const uncapped = oldSpaceLimitMb([]);
    // heap_size_limit is the old space plus the young generation's reserve.
    expect(capped).toBeGreaterThanOrEqual(256);
    expect(capped).toBeLessThan(256 + 100);
    expect(uncapped).toBeGreaterThan(capped * 2);
  });
});
