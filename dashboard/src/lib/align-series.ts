/** One series as the API sends it (times in ms since the epoch). */
export interface TimedValues {
  t: readonly number[];
  values: readonly (number | null)[];
}

/**
 * Puts several series on one shared, sorted time axis (the union of their times), with null
 * where a series has no point: the shape uPlot draws from.
 */
export function alignSeries(series: readonly TimedValues[]): {
  t: number[];
  columns: (number | null)[][];
} {
  const times = new Set<number>();
  for (const s of series) for (const t of s.t) times.add(t);
  const t = [...times].sort((a, b) => a - b);
  const index = new Map(t.map((time, i) => [time, i]));
  const columns = series.map((s) => {
    const column: (number | null)[] = new Array<number | null>(t.length).fill(null);
    s.t.forEach((time, i) => {
      const v = s.values[i];
      column[index.get(time)!] = v === undefined || v === null || !Number.isFinite(v) ? null : v;
    });
    return column;
  });
  return { t, columns };
}
