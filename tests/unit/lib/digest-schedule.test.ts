import { describe, expect, it } from 'vitest';
import {
  duePeriod,
  hourStart,
  isValidTimeZone,
  isoWeekKey,
  latestDigestPeriod,
  localDateTime,
  zonedTimeToInstant,
} from '@/src/lib/digest-schedule';

const at = (iso: string) => new Date(iso);
const HOUR = 3_600_000;

describe('localDateTime', () => {
  it('reads the wall clock of a zone with a 45-minute offset, weekday included', () => {
    // Pacific/Chatham is UTC+13:45 in (southern) summer.
    expect(localDateTime(at('2026-12-01T10:00:00Z'), 'Pacific/Chatham')).toEqual({
      year: 2026,
      month: 12,
      day: 1,
      hour: 23,
      minute: 45,
      weekday: 2,
    });
  });

  it('reads midnight as hour 0, not 24', () => {
    expect(localDateTime(at('2026-11-29T23:00:00Z'), 'Europe/Oslo')).toMatchObject({ day: 30, hour: 0, weekday: 1 });
  });
});

describe('zonedTimeToInstant', () => {
  it('converts a local hour to the instant in winter and in summer', () => {
    expect(zonedTimeToInstant({ year: 2026, month: 1, day: 12 }, 8, 'Europe/Oslo').toISOString()).toBe(
      '2026-01-12T07:00:00.000Z',
    );
    expect(zonedTimeToInstant({ year: 2026, month: 7, day: 13 }, 8, 'Europe/Oslo').toISOString()).toBe(
      '2026-07-13T06:00:00.000Z',
    );
  });

  it('maps an hour skipped by the start of summer time to the first instant after the gap', () => {
    // 29 March 2026 in Oslo: 02:00 jumps to 03:00.
    expect(zonedTimeToInstant({ year: 2026, month: 3, day: 29 }, 2, 'Europe/Oslo').toISOString()).toBe(
      '2026-03-29T01:00:00.000Z',
    );
  });

  it('maps an hour that happens twice at the end of summer time to its first occurrence', () => {
    // 25 October 2026 in Oslo: 02:00-03:00 happens at +02:00 and again at +01:00.
    expect(zonedTimeToInstant({ year: 2026, month: 10, day: 25 }, 2, 'Europe/Oslo').toISOString()).toBe(
      '2026-10-25T00:00:00.000Z',
    );
  });
});

describe('isoWeekKey', () => {
  it('gives ISO 8601 weeks, including the ones that straddle a new year', () => {
    expect(isoWeekKey({ year: 2026, month: 11, day: 30 })).toBe('2026-W49');
    expect(isoWeekKey({ year: 2027, month: 1, day: 1 })).toBe('2026-W53');
    expect(isoWeekKey({ year: 2024, month: 12, day: 30 })).toBe('2025-W01');
    // Sunday closes its ISO week (Monday to Sunday).
    expect(isoWeekKey({ year: 2026, month: 12, day: 6 })).toBe('2026-W49');
  });
});

describe('latestDigestPeriod', () => {
  const mondayEight = { digestDay: 1, digestHour: 8, timeZone: 'Europe/Oslo' };

  it('is due at the local day and hour and covers the seven local days before it', () => {
    const p = latestDigestPeriod(mondayEight, at('2026-11-30T07:30:00Z')); // Monday 08:30 in Oslo
    expect(p.end.toISOString()).toBe('2026-11-30T07:00:00.000Z');
    expect(p.start.toISOString()).toBe('2026-11-23T07:00:00.000Z');
    expect(p.previousStart.toISOString()).toBe('2026-11-16T07:00:00.000Z');
    expect(p.key).toBe('2026-W49');
  });

  it('falls back to the previous week one minute before the due hour', () => {
    const p = latestDigestPeriod(mondayEight, at('2026-11-30T06:59:00Z'));
    expect(p.end.toISOString()).toBe('2026-11-23T07:00:00.000Z');
    expect(p.key).toBe('2026-W48');
  });

  it('makes the week 169 hours long when it spans the end of summer time', () => {
    const p = latestDigestPeriod(mondayEight, at('2026-10-26T07:00:00Z')); // Monday 08:00 CET
    expect(p.end.toISOString()).toBe('2026-10-26T07:00:00.000Z');
    expect(p.end.getTime() - p.start.getTime()).toBe(169 * HOUR);
  });

  it('treats day 0 as Sunday', () => {
    const p = latestDigestPeriod({ digestDay: 0, digestHour: 18, timeZone: 'UTC' }, at('2026-12-02T12:00:00Z')); // a Wednesday
    expect(p.end.toISOString()).toBe('2026-11-29T18:00:00.000Z');
    expect(new Date(p.end).getUTCDay()).toBe(0);
  });

  it('follows a zone whose hours start at a quarter past the UTC hour', () => {
    // Tuesday 09:00 in Chatham (+13:45) is Monday 19:15 UTC.
    const p = latestDigestPeriod(
      { digestDay: 2, digestHour: 9, timeZone: 'Pacific/Chatham' },
      at('2026-11-30T19:20:00Z'),
    );
    expect(p.end.toISOString()).toBe('2026-11-30T19:15:00.000Z');
    expect(p.key).toBe('2026-W49');
  });
});

describe('duePeriod', () => {
  const timing = { digestDay: 1, digestHour: 8, timeZone: 'Europe/Oslo' };

  it('returns the period from the due moment until the end of the catch-up window, and null after', () => {
    expect(duePeriod(timing, at('2026-11-30T07:00:00Z'), 6)?.key).toBe('2026-W49');
    expect(duePeriod(timing, at('2026-11-30T13:00:00Z'), 6)?.key).toBe('2026-W49');
    expect(duePeriod(timing, at('2026-11-30T13:00:01Z'), 6)).toBeNull();
    expect(duePeriod(timing, at('2026-11-30T06:59:59Z'), 6)).toBeNull();
  });

  it('gives every scan within the window the same key, so the digest is sent once', () => {
    const keys = new Set(
      [0, 1, 2, 3, 4, 5].map(
        (h) => duePeriod(timing, new Date(at('2026-11-30T07:10:00Z').getTime() + h * HOUR), 6)?.key,
      ),
    );
    expect([...keys]).toEqual(['2026-W49']);
  });
});

describe('helpers', () => {
  it('knows IANA zone names and refuses made-up ones', () => {
    expect(isValidTimeZone('America/Halifax')).toBe(true);
    expect(isValidTimeZone('UTC')).toBe(true);
    expect(isValidTimeZone('Mars/Olympus_Mons')).toBe(false);
    expect(isValidTimeZone('')).toBe(false);
  });

  it('rounds an instant down to its UTC hour', () => {
    expect(hourStart(at('2026-11-30T07:59:59.999Z')).toISOString()).toBe('2026-11-30T07:00:00.000Z');
  });
});
