/**
 * When a weekly digest is due, and which week it covers. Pure: an instant and a subscription's
 * local day, hour and IANA time zone in, instants and keys out. Time zones go through the
 * platform's Intl data (no table of offsets of our own), so summer time and odd offsets
 * (+05:45, +12:45) come out right.
 *
 * A subscription asks for its digest on `day` (0 = Sunday ... 6 = Saturday) at `hour`:00 local
 * time. The digest that goes out then covers the seven local days before that moment; the week
 * before those seven days is the comparison for the pass-rate change. The period key is the
 * ISO week (YYYY-Www) of the local date the digest is due, so that changing the day or the time
 * zone in the middle of a week never yields a second digest for that week.
 */

export interface LocalDateTime {
  year: number;
  /** 1-12 */
  month: number;
  /** 1-31 */
  day: number;
  /** 0-23 */
  hour: number;
  minute: number;
  /** 0 = Sunday ... 6 = Saturday */
  weekday: number;
}

export interface DigestTiming {
  digestDay: number;
  digestHour: number;
  timeZone: string;
}

export interface DigestPeriod {
  /** ISO week of the local due date, e.g. `2026-W49`: one digest per subscription and key. */
  key: string;
  /** The due instant; the digest covers [start, end). */
  end: Date;
  start: Date;
  /** Start of the week before, for the comparison: [previousStart, start). */
  previousStart: Date;
}

const WEEKDAYS: Record<string, number> = { Sun: 0, Mon: 1, Tue: 2, Wed: 3, Thu: 4, Fri: 5, Sat: 6 };
const HOUR_MS = 3_600_000;
const DAY_MS = 24 * HOUR_MS;

const formatters = new Map<string, Intl.DateTimeFormat>();

function formatterFor(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-US', {
      timeZone,
      hourCycle: 'h23',
      year: 'numeric',
      month: 'numeric',
      day: 'numeric',
      hour: 'numeric',
      minute: 'numeric',
      weekday: 'short',
    });
    formatters.set(timeZone, f);
  }
  return f;
}

/** True for a time zone name the platform knows (`Europe/Oslo`, `UTC`, `Pacific/Chatham`). */
export function isValidTimeZone(timeZone: string): boolean {
  if (!timeZone) return false;
  try {
    formatterFor(timeZone);
    return true;
  } catch {
    return false;
  }
}

/** The wall-clock reading of `instant` in `timeZone`. */
export function localDateTime(instant: Date, timeZone: string): LocalDateTime {
  const parts: Partial<Record<Intl.DateTimeFormatPartTypes, string>> = {};
  for (const p of formatterFor(timeZone).formatToParts(instant)) parts[p.type] = p.value;
  return {
    year: Number(parts.year),
    month: Number(parts.month),
    day: Number(parts.day),
    hour: Number(parts.hour) % 24,
    minute: Number(parts.minute),
    weekday: WEEKDAYS[parts.weekday ?? ''] ?? 0,
  };
}

/** Milliseconds the zone's clock is ahead of UTC at `instant`. */
function offsetAt(instant: number, timeZone: string): number {
  const l = localDateTime(new Date(instant), timeZone);
  const asUtc = Date.UTC(l.year, l.month - 1, l.day, l.hour, l.minute);
  // Offsets are whole minutes; drop the instant's seconds before comparing.
  return asUtc - Math.floor(instant / 60_000) * 60_000;
}

/**
 * The instant at which the clock in `timeZone` reads `year-month-day hour:00`. A local time that
 * does not exist (the hour skipped when summer time starts) maps to the first instant after the
 * gap; one that exists twice (the hour repeated when it ends) maps to the first occurrence.
 */
export function zonedTimeToInstant(
  date: { year: number; month: number; day: number },
  hour: number,
  timeZone: string,
): Date {
  const wall = Date.UTC(date.year, date.month - 1, date.day, hour);
  // Try the offsets in force a day either side; keep the earliest instant that reads `wall`.
  const candidates = [offsetAt(wall - DAY_MS, timeZone), offsetAt(wall, timeZone), offsetAt(wall + DAY_MS, timeZone)];
  const exact = candidates
    .map((offset) => wall - offset)
    .filter((t) => offsetAt(t, timeZone) + t === wall)
    .sort((a, b) => a - b);
  if (exact[0] !== undefined) return new Date(exact[0]);
  // In a gap: the wall time is skipped. Use the offset from before the gap, which lands after it.
  return new Date(wall - Math.min(...candidates));
}

/** The calendar date `days` away from `date` (negative for earlier). */
export function addDays(
  date: { year: number; month: number; day: number },
  days: number,
): { year: number; month: number; day: number } {
  const d = new Date(Date.UTC(date.year, date.month - 1, date.day) + days * DAY_MS);
  return { year: d.getUTCFullYear(), month: d.getUTCMonth() + 1, day: d.getUTCDate() };
}

/** ISO 8601 week of a calendar date, as `YYYY-Www` (weeks start on Monday; week 1 holds 4 January). */
export function isoWeekKey(date: { year: number; month: number; day: number }): string {
  const d = new Date(Date.UTC(date.year, date.month - 1, date.day));
  const weekday = d.getUTCDay() || 7; // Monday 1 ... Sunday 7
  // The Thursday of this week decides the ISO year.
  d.setUTCDate(d.getUTCDate() + 4 - weekday);
  const isoYear = d.getUTCFullYear();
  const week = Math.ceil(((d.getTime() - Date.UTC(isoYear, 0, 1)) / DAY_MS + 1) / 7);
  return `${isoYear}-W${String(week).padStart(2, '0')}`;
}

/**
 * The latest due moment of a subscription at or before `now`, with the week it covers. Every
 * bound is computed on the local calendar, so a week across a summer-time change is 167 or 169
 * hours long, as the subscriber's clock says.
 */
export function latestDigestPeriod(timing: DigestTiming, now: Date): DigestPeriod {
  const local = localDateTime(now, timing.timeZone);
  const back = (local.weekday - timing.digestDay + 7) % 7;
  let dueDate = addDays(local, -back);
  let end = zonedTimeToInstant(dueDate, timing.digestHour, timing.timeZone);
  if (end.getTime() > now.getTime()) {
    dueDate = addDays(dueDate, -7);
    end = zonedTimeToInstant(dueDate, timing.digestHour, timing.timeZone);
  }
  return periodEndingOn(dueDate, timing);
}

/** The period whose digest is due on the local date `dueDate` at the subscription's hour. */
export function periodEndingOn(
  dueDate: { year: number; month: number; day: number },
  timing: Pick<DigestTiming, 'digestHour' | 'timeZone'>,
): DigestPeriod {
  return {
    key: isoWeekKey(dueDate),
    end: zonedTimeToInstant(dueDate, timing.digestHour, timing.timeZone),
    start: zonedTimeToInstant(addDays(dueDate, -7), timing.digestHour, timing.timeZone),
    previousStart: zonedTimeToInstant(addDays(dueDate, -14), timing.digestHour, timing.timeZone),
  };
}

/**
 * The period to send now, or null: the latest due moment if it is at most `catchUpHours` old.
 * The look-back lets a scheduler that missed an hour (all workers down, a deploy) still send,
 * and a subscription saved a little after its hour still get this week's digest; the period
 * key keeps it to one digest per week whatever the number of scans.
 */
export function duePeriod(timing: DigestTiming, now: Date, catchUpHours: number): DigestPeriod | null {
  const period = latestDigestPeriod(timing, now);
  const age = now.getTime() - period.end.getTime();
  return age >= 0 && age <= catchUpHours * HOUR_MS ? period : null;
}

/** The start of the UTC hour holding `instant` (the scheduler ticks once per UTC hour). */
export function hourStart(instant: Date): Date {
  return new Date(Math.floor(instant.getTime() / HOUR_MS) * HOUR_MS);
}

/** A preview has no due moment: it covers the seven days before `now`. */
export function previewPeriod(now: Date): DigestPeriod {
  return {
    key: `preview-${now.toISOString()}`,
    end: now,
    start: new Date(now.getTime() - 7 * DAY_MS),
    previousStart: new Date(now.getTime() - 14 * DAY_MS),
  };
}
