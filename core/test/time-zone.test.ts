import { describe, expect, it } from 'vitest';
import {
  isValidTimeZone,
  localDateString,
  localDateTime,
  startOfLocalDay,
  startOfNextLocalDay,
  timeZoneOffsetSeconds,
  zonedTimeToEpochSeconds,
} from '../src/index.js';

describe('time zones with Intl only', () => {
  it('offsets follow daylight saving in both hemispheres', () => {
    expect(timeZoneOffsetSeconds('America/Denver', Date.UTC(2025, 0, 15) / 1000)).toBe(-7 * 3600);
    expect(timeZoneOffsetSeconds('America/Denver', Date.UTC(2025, 6, 15) / 1000)).toBe(-6 * 3600);
    expect(timeZoneOffsetSeconds('Australia/Sydney', Date.UTC(2025, 0, 15) / 1000)).toBe(11 * 3600);
    expect(timeZoneOffsetSeconds('Australia/Sydney', Date.UTC(2025, 6, 15) / 1000)).toBe(10 * 3600);
    expect(timeZoneOffsetSeconds('Etc/GMT+7', Date.UTC(2003, 9, 17) / 1000)).toBe(-7 * 3600);
  });

  it('local midnights around a DST change give a 23-hour day', () => {
    const zone = 'America/Denver';
    const inside = Date.UTC(2025, 2, 9, 18) / 1000; // 2025-03-09, the spring-forward day
    const start = startOfLocalDay(inside, zone);
    const end = startOfNextLocalDay(inside, zone);
    expect(localDateString(start, zone)).toBe('2025-03-09');
    expect(localDateTime(start, zone)).toMatchObject({ hour: 0, minute: 0, second: 0 });
    expect((end - start) / 3600).toBe(23);
  });

  it('wall-clock time converts back to the instant', () => {
    const t = zonedTimeToEpochSeconds(
      { year: 2025, month: 7, day: 4, hour: 6, minute: 30, second: 0 },
      'America/Denver',
    );
    expect(t).toBe(Date.UTC(2025, 6, 4, 12, 30) / 1000);
  });

  it('knows which zone names are real', () => {
    expect(isValidTimeZone('Pacific/Auckland')).toBe(true);
    expect(isValidTimeZone('Mars/Olympus_Mons')).toBe(false);
  });
});
