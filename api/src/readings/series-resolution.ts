/** Where a series' points come from: raw readings or one of ingest's bucket tables. */
export type SeriesSource = 'raw' | 'minute' | 'ten_minute' | 'hour' | 'six_hour' | 'day';

export interface SeriesResolution {
  source: SeriesSource;
  /** Width of one point. For `raw` it is the site's reporting interval (points are readings). */
  stepSeconds: number;
  label: string;
}

const SOURCE_SECONDS: Record<Exclude<SeriesSource, 'raw'>, number> = {
  minute: 60,
  ten_minute: 600,
  hour: 3600,
  six_hour: 21600,
  day: 86400,
};

/**
 * Point widths, finest first, each read from the coarsest table that divides it. Every width
 * from 10 minutes up is a whole number of ten-minute buckets, so no range regroups more than
 * about 7,000 minute buckets per channel (at most 4.9 days: longer ones read ten-minute buckets).
 */
const LADDER: [number, Exclude<SeriesSource, 'raw'>][] = [
  [60, 'minute'],
  [120, 'minute'],
  [300, 'minute'],
  [600, 'ten_minute'],
  [1200, 'ten_minute'],
  [1800, 'ten_minute'],
  [3600, 'hour'],
  [7200, 'hour'],
  [10800, 'hour'],
  [21600, 'six_hour'],
  [43200, 'six_hour'],
  [86400, 'day'],
  [2 * 86400, 'day'],
  [7 * 86400, 'day'],
];

export const MAX_POINTS = 2000;
/**
 * A coarser table is used at its native width when that still gives at least this many points:
 * a 30-day range reads 720 hour buckets instead of 43,200 minute buckets for 1,440 points.
 */
export const MIN_POINTS_FOR_NATIVE = 700;

/**
 * Picks the resolution of a series so each channel has at most 2,000 points (about 1,000 to
 * 2,000 for long ranges), and the number of rows read stays bounded whatever the range.
 * `finest` is the finest source kept for the whole range: raw readings and minute buckets are
 * dropped after their retentions, and a range that starts before them reads the next kept one,
 * however short it is.
 */
export function pickResolution(
  spanSeconds: number,
  rawIntervalSeconds: number,
  finest: 'raw' | 'minute' | 'ten_minute' = 'raw',
): SeriesResolution {
  if (finest === 'raw' && spanSeconds / rawIntervalSeconds <= MAX_POINTS) {
    return { source: 'raw', stepSeconds: rawIntervalSeconds, label: 'raw readings' };
  }
  const finestSeconds = finest === 'raw' ? 0 : SOURCE_SECONDS[finest];
  let chosen = LADDER.find(
    ([step, source]) => SOURCE_SECONDS[source] >= finestSeconds && spanSeconds / step <= MAX_POINTS,
  );
  if (!chosen) {
    const weeks = Math.ceil(spanSeconds / MAX_POINTS / (7 * 86400));
    chosen = [weeks * 7 * 86400, 'day'];
  }
  const [step, source] = chosen;
  for (const coarser of ['ten_minute', 'hour', 'six_hour', 'day'] as const) {
    const native = SOURCE_SECONDS[coarser];
    if (
      native > SOURCE_SECONDS[source] &&
      native > step &&
      spanSeconds / native >= MIN_POINTS_FOR_NATIVE
    ) {
      return { source: coarser, stepSeconds: native, label: stepLabel(native) };
    }
  }
  return { source, stepSeconds: step, label: stepLabel(step) };
}

export function stepLabel(seconds: number): string {
  if (seconds % 604800 === 0) return `${seconds / 604800} week${seconds === 604800 ? '' : 's'}`;
  if (seconds % 86400 === 0) return `${seconds / 86400} day${seconds === 86400 ? '' : 's'}`;
  if (seconds % 3600 === 0) return `${seconds / 3600} h`;
  if (seconds % 60 === 0) return `${seconds / 60} min`;
  return `${seconds} s`;
}
