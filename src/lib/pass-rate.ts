/**
 * Pass-rate trend: daily counts of builds and passes, and a trailing-window rate that smooths
 * nights without builds. Pure, for the project page's chart and the digests.
 */

export interface DayCount {
  /** YYYY-MM-DD (UTC). */
  day: string;
  builds: number;
  passed: number;
}

export interface TrendPoint extends DayCount {
  /** Passed / builds over the trailing `window` days ending here; null when there was no build. */
  rate: number | null;
}

/** Every day from `first` to `last` inclusive (UTC), so gaps show as days without builds. */
export function fillDays(counts: DayCount[], first: string, last: string): DayCount[] {
  const byDay = new Map(counts.map((c) => [c.day, c]));
  const out: DayCount[] = [];
  for (let t = Date.parse(`${first}T00:00:00Z`); t <= Date.parse(`${last}T00:00:00Z`); t += 86_400_000) {
    const day = new Date(t).toISOString().slice(0, 10);
    out.push(byDay.get(day) ?? { day, builds: 0, passed: 0 });
  }
  return out;
}

export function trailingPassRate(days: DayCount[], window: number): TrendPoint[] {
  let builds = 0;
  let passed = 0;
  return days.map((d, i) => {
    builds += d.builds;
    passed += d.passed;
    const leaving = days[i - window];
    if (leaving) {
      builds -= leaving.builds;
      passed -= leaving.passed;
    }
    return { ...d, rate: builds > 0 ? passed / builds : null };
  });
}
