/**
 * Local time in a site's IANA time zone, with nothing but `Intl.DateTimeFormat` (no date
 * library): offsets, local dates and local midnights. Times are epoch seconds.
 */

const formatters = new Map<string, Intl.DateTimeFormat>();

function formatterFor(timeZone: string): Intl.DateTimeFormat {
  let formatter = formatters.get(timeZone);
  if (!formatter) {
    formatter = new Intl.DateTimeFormat('en-US', {
      timeZone,
      hourCycle: 'h23',
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
    });
    formatters.set(timeZone, formatter);
  }
  return formatter;
}

/** Returns true when the runtime knows the IANA time zone name (e.g. 'America/Denver'). */
export function isValidTimeZone(timeZone: string): boolean {
  try {
    formatterFor(timeZone);
    return true;
  } catch {
    return false;
  }
}

/** Calendar fields of an instant as seen on a clock in a time zone. */
export interface LocalDateTime {
  year: number;
  /** 1–12 */
  month: number;
  day: number;
  hour: number;
  minute: number;
  second: number;
}

/** The wall-clock fields of an instant in a time zone. Throws RangeError for an unknown zone. */
export function localDateTime(epochSeconds: number, timeZone: string): LocalDateTime {
  const parts = formatterFor(timeZone).formatToParts(new Date(Math.floor(epochSeconds) * 1000));
  const field = (type: Intl.DateTimeFormatPartTypes): number =>
    Number(parts.find((p) => p.type === type)?.value ?? 0);
  return {
    year: field('year'),
    month: field('month'),
    day: field('day'),
    hour: field('hour') % 24,
    minute: field('minute'),
    second: field('second'),
  };
}

/**
 * Offset of the zone from UTC at an instant, seconds (local = UTC + offset; −25200 for UTC−7).
 */
export function timeZoneOffsetSeconds(timeZone: string, epochSeconds: number): number {
  const whole = Math.floor(epochSeconds);
  const l = localDateTime(whole, timeZone);
  const asUtc = Date.UTC(l.year, l.month - 1, l.day, l.hour, l.minute, l.second) / 1000;
  return asUtc - whole;
}

/**
 * The instant at which a wall clock in the zone shows the given fields. In a DST gap the
 * later offset is used; in an overlap, the earlier instant.
 */
export function zonedTimeToEpochSeconds(local: LocalDateTime, timeZone: string): number {
  const asUtc =
    Date.UTC(local.year, local.month - 1, local.day, local.hour, local.minute, local.second) / 1000;
  const first = asUtc - timeZoneOffsetSeconds(timeZone, asUtc);
  const second = asUtc - timeZoneOffsetSeconds(timeZone, first);
  return Math.min(first, second);
}

/** The local calendar date of an instant as 'YYYY-MM-DD'. */
export function localDateString(epochSeconds: number, timeZone: string): string {
  const l = localDateTime(epochSeconds, timeZone);
  return `${String(l.year).padStart(4, '0')}-${String(l.month).padStart(2, '0')}-${String(l.day).padStart(2, '0')}`;
}

/** Local midnight at the start of the local day that contains the instant, epoch seconds. */
export function startOfLocalDay(epochSeconds: number, timeZone: string): number {
  const l = localDateTime(epochSeconds, timeZone);
  return zonedTimeToEpochSeconds({ ...l, hour: 0, minute: 0, second: 0 }, timeZone);
}

/** Local midnight starting the next local day, epoch seconds (handles 23 h and 25 h days). */
export function startOfNextLocalDay(epochSeconds: number, timeZone: string): number {
  const l = localDateTime(epochSeconds, timeZone);
  const next = new Date(Date.UTC(l.year, l.month - 1, l.day + 1));
  return zonedTimeToEpochSeconds(
    {
      year: next.getUTCFullYear(),
      month: next.getUTCMonth() + 1,
      day: next.getUTCDate(),
      hour: 0,
      minute: 0,
      second: 0,
    },
    timeZone,
  );
}
