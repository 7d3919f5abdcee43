import { localDateTime, zonedTimeToEpochSeconds } from '@wellkept/core';

/** A person's quiet hours: wall-clock times ('HH:MM' or 'HH:MM:SS') in their time zone. */
export interface QuietHours {
  start: string;
  end: string;
  timeZone: string;
}

/** Whether an instant falls in the quiet hours, and if so when they end (epoch seconds). */
export type QuietHoursState = { quiet: false } | { quiet: true; endsAt: number };

function secondsOfDay(clock: string): number {
  const match = /^(\d{1,2}):(\d{2})(?::(\d{2})(?:\.\d+)?)?$/.exec(clock.trim());
  if (!match) throw new Error(`quiet hours time '${clock}' is not HH:MM or HH:MM:SS`);
  const [h, m, s] = [Number(match[1]), Number(match[2]), Number(match[3] ?? 0)];
  if (h > 24 || m > 59 || s > 59) throw new Error(`quiet hours time '${clock}' is out of range`);
  return (h * 3600 + m * 60 + s) % 86_400;
}

/**
 * Quiet hours may wrap midnight (22:00–07:00) or not (13:00–15:00); equal start and end means
 * none. The end is found on the wall clock of the person's zone, so a daylight-saving change
 * during the night still ends them at the local time they chose.
 */
export function quietHoursAt(epochSeconds: number, hours: QuietHours | null): QuietHoursState {
  if (!hours) return { quiet: false };
  const start = secondsOfDay(hours.start);
  const end = secondsOfDay(hours.end);
  if (start === end) return { quiet: false };
  const local = localDateTime(epochSeconds, hours.timeZone);
  const now = local.hour * 3600 + local.minute * 60 + local.second;
  const quiet = start < end ? now >= start && now < end : now >= start || now < end;
  if (!quiet) return { quiet: false };
  // The end falls later today, or tomorrow when the quiet hours began this evening.
  const dayOffset = start > end && now >= start ? 1 : 0;
  const day = new Date(Date.UTC(local.year, local.month - 1, local.day + dayOffset));
  const endsAt = zonedTimeToEpochSeconds(
    {
      year: day.getUTCFullYear(),
      month: day.getUTCMonth() + 1,
      day: day.getUTCDate(),
      hour: Math.floor(end / 3600),
      minute: Math.floor((end % 3600) / 60),
      second: end % 60,
    },
    hours.timeZone,
  );
  return { quiet: true, endsAt: Math.max(endsAt, epochSeconds + 1) };
}
