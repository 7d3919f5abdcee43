import { describe, expect, it } from 'vitest';
import { quietHoursAt } from '../../src/notifications/quiet-hours.js';

const at = (iso: string) => Date.parse(iso) / 1000;

describe('quiet hours', () => {
  const denver = { start: '22:00', end: '07:00', timeZone: 'America/Denver' };

  it('wraps midnight and ends at the local morning time', () => {
    // 23:30 MST on 20 Nov → quiet until 07:00 MST on 21 Nov (14:00 UTC).
    expect(quietHoursAt(at('2026-11-21T06:30:00Z'), denver)).toEqual({
      quiet: true,
      endsAt: at('2026-11-21T14:00:00Z'),
    });
    // 03:00 MST → the same morning's end.
    expect(quietHoursAt(at('2026-11-21T10:00:00Z'), denver)).toEqual({
      quiet: true,
      endsAt: at('2026-11-21T14:00:00Z'),
    });
    expect(quietHoursAt(at('2026-11-21T14:00:00Z'), denver)).toEqual({ quiet: false });
    expect(quietHoursAt(at('2026-11-21T04:59:00Z'), denver)).toEqual({ quiet: false }); // 21:59
  });

  it('keeps the chosen wall-clock end across a daylight-saving change', () => {
    // The night of 7–8 March 2026: clocks go forward at 02:00 in Denver; 07:00 MDT is 13:00 UTC.
    expect(quietHoursAt(at('2026-03-08T06:00:00Z'), denver)).toEqual({
      quiet: true,
      endsAt: at('2026-03-08T13:00:00Z'),
    });
  });

  it('handles daytime quiet hours, equal ends and none', () => {
    const nap = { start: '13:00:00', end: '15:30:00', timeZone: 'Australia/Adelaide' };
    // 14:00 ACDT (UTC+10:30) on 1 Dec = 03:30 UTC.
    expect(quietHoursAt(at('2026-12-01T03:30:00Z'), nap)).toEqual({
      quiet: true,
      endsAt: at('2026-12-01T05:00:00Z'),
    });
    expect(quietHoursAt(at('2026-12-01T05:00:00Z'), nap)).toEqual({ quiet: false });
    expect(quietHoursAt(at('2026-12-01T03:30:00Z'), { ...nap, end: '13:00' })).toEqual({
      quiet: false,
    });
    expect(quietHoursAt(at('2026-12-01T03:30:00Z'), null)).toEqual({ quiet: false });
  });

  it('says what is wrong with a malformed time', () => {
    expect(() => quietHoursAt(0, { start: '25:00', end: '07:00', timeZone: 'UTC' })).toThrow(
      /out of range/,
    );
    expect(() => quietHoursAt(0, { start: 'late', end: '07:00', timeZone: 'UTC' })).toThrow(
      /not HH:MM/,
    );
  });
});
