import { describe, expect, it } from 'vitest';
import { sessionRevoked } from '@/src/server/auth/revocation';

describe('sessionRevoked', () => {
  const reset = new Date('2026-12-01T10:00:00.700Z');
  const seconds = (iso: string) => Math.floor(Date.parse(iso) / 1000);

  it('voids sessions issued before a password reset', () => {
    expect(sessionRevoked(seconds('2026-12-01T09:59:59Z'), reset)).toBe(true);
  });

  it('keeps sessions issued in the same second as the reset or later, and all when there was none', () => {
    expect(sessionRevoked(seconds('2026-12-01T10:00:00Z'), reset)).toBe(false);
    expect(sessionRevoked(seconds('2026-12-01T10:05:00Z'), reset)).toBe(false);
    expect(sessionRevoked(0, null)).toBe(false);
  });
});
