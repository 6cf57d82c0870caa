import { describe, expect, it } from 'vitest';
import { formatAgo, formatPercent, shortCommit } from '@/src/lib/format';

describe('display helpers', () => {
  it('shortens hexadecimal commits to 8 characters and leaves other labels alone', () => {
    expect(shortCommit('9c1e2f0a5b6c7d8e')).toBe('9c1e2f0a');
    expect(shortCommit('manual')).toBe('manual');
  });

  it('says how long ago in the largest whole unit', () => {
    const now = new Date('2026-12-01T12:00:00Z');
    expect(formatAgo(new Date('2026-12-01T11:59:30Z'), now)).toBe('just now');
    expect(formatAgo(new Date('2026-12-01T11:15:00Z'), now)).toBe('45 min ago');
    expect(formatAgo(new Date('2026-12-01T07:00:00Z'), now)).toBe('5 h ago');
    expect(formatAgo(new Date('2026-11-30T12:00:00Z'), now)).toBe('1 day ago');
    expect(formatAgo(new Date('2026-11-20T12:00:00Z'), now)).toBe('11 days ago');
  });

  it('writes percentages with one decimal below 10 % only', () => {
    expect(formatPercent(0.9333)).toBe('93 %');
    expect(formatPercent(0.005)).toBe('0.5 %');
    expect(formatPercent(0)).toBe('0 %');
  });
});
