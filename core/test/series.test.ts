import { describe, expect, it } from 'vitest';
import { sampleAtOrBefore, samplesAtOrBefore, type Sample } from '../src/index.js';

/** A small deterministic generator, so a failure repeats. */
function lcg(seed: number): () => number {
  let x = seed;
  return () => {
    x = (x * 1_103_515_245 + 12_345) % 2 ** 31;
    return x / 2 ** 31;
  };
}

describe('samples at or before many instants', () => {
  it('gives what the one-instant lookup gives, for unsorted samples with ties and any instants', () => {
    for (let seed = 1; seed <= 40; seed++) {
      const random = lcg(seed);
      // Whole-second times in a short range, so equal times (ties) are common.
      const samples: Sample[] = Array.from({ length: Math.floor(random() * 60) }, (_, i) => ({
        t: Math.floor(random() * 50),
        v: i,
      }));
      const times = Array.from({ length: 30 }, () => Math.floor(random() * 60) - 5);
      const many = samplesAtOrBefore(samples, times);
      expect(many).toEqual(times.map((t) => sampleAtOrBefore(samples, t)));
      // The very objects, not copies: callers compare and reuse them.
      many.forEach((s, i) => expect(s).toBe(sampleAtOrBefore(samples, times[i]!)));
    }
  });

  it('is null before the first sample and for no samples', () => {
    expect(samplesAtOrBefore([{ t: 10, v: 1 }], [9, 10, 11])).toEqual([
      null,
      { t: 10, v: 1 },
      { t: 10, v: 1 },
    ]);
    expect(samplesAtOrBefore([], [1, 2])).toEqual([null, null]);
  });
});
