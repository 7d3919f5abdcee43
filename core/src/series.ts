/**
 * Time series as plain data: what a database layer fills and what the rule evaluators read.
 * Times are seconds since the Unix epoch (UTC), possibly fractional.
 */

/** One reading of a channel: `t` in epoch seconds, `v` the value in the channel's SI unit. */
export interface Sample<T = number> {
  t: number;
  v: T;
}

/** Samples ordered by time (oldest first), for the functions that need order. Copies. */
export function sortSamples<T>(samples: readonly Sample<T>[]): Sample<T>[] {
  return [...samples].sort((a, b) => a.t - b.t);
}

/** Samples with `fromT <= t <= toT`. */
export function samplesBetween<T>(
  samples: readonly Sample<T>[],
  fromT: number,
  toT: number,
): Sample<T>[] {
  return samples.filter((s) => s.t >= fromT && s.t <= toT);
}

/** Numeric samples whose value is a finite number (drops NaN and Infinity). */
export function finiteSamples(samples: readonly Sample[]): Sample[] {
  return samples.filter((s) => Number.isFinite(s.t) && Number.isFinite(s.v));
}

/** The latest sample at or before `t`, or null. Samples need not be sorted. */
export function sampleAtOrBefore<T>(samples: readonly Sample<T>[], t: number): Sample<T> | null {
  let best: Sample<T> | null = null;
  for (const s of samples) {
    if (s.t <= t && (best === null || s.t > best.t)) best = s;
  }
  return best;
}

/**
 * {@link sampleAtOrBefore} for many instants at once, in one pass over the samples instead of
 * one per instant (a day of per-minute samples made the per-instant form quadratic: millions of
 * comparisons per judgement). Same answers, ties included; neither argument need be sorted.
 */
export function samplesAtOrBefore<T>(
  samples: readonly Sample<T>[],
  times: readonly number[],
): (Sample<T> | null)[] {
  const sorted = sortSamples(samples); // stable: among equal times the first stays first
  const order = times.map((_, i) => i).sort((a, b) => (times[a] as number) - (times[b] as number));
  const out: (Sample<T> | null)[] = new Array<Sample<T> | null>(times.length).fill(null);
  let best: Sample<T> | null = null;
  let next = 0;
  for (const i of order) {
    const t = times[i] as number;
    while (next < sorted.length && (sorted[next] as Sample<T>).t <= t) {
      const s = sorted[next] as Sample<T>;
      if (best === null || s.t > best.t) best = s;
      next += 1;
    }
    out[i] = best;
  }
  return out;
}

/** The newest sample, or null for an empty series. */
export function latestSample<T>(samples: readonly Sample<T>[]): Sample<T> | null {
  return sampleAtOrBefore(samples, Number.POSITIVE_INFINITY);
}

/** Mean of the values of numeric samples, or null when there are none. */
export function meanValue(samples: readonly Sample[]): number | null {
  if (samples.length === 0) return null;
  let sum = 0;
  for (const s of samples) sum += s.v;
  return sum / samples.length;
}
