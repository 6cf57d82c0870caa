import { Writable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { createLogger } from '@/src/server/logger';

function capture(): { lines: () => Record<string, unknown>[]; stream: Writable } {
  const out: string[] = [];
  const stream = new Writable({
    write(chunk, _enc, cb) {
      out.push(String(chunk));
      cb();
    },
  });
  return {
    stream,
    lines: () =>
      out
        .join('')
        .trim()
        .split('\n')
        .map((l) => JSON.parse(l) as Record<string, unknown>),
  };
}

describe('logger', () => {
  it('redacts tokens, passwords, cookies and authorization headers in JSON output', () => {
    const { stream, lines } = capture();
    const log = createLogger({ destination: stream, level: 'info' });
    log.info(
      {
        token: 'vg_secret',
        user: { password: 'hunter22', email: 'a@b.example' },
        req: { headers: { authorization: 'Bearer vg_abc', cookie: 'session=xyz', accept: 'text/html' } },
      },
      'request',
    );
    const [line] = lines();
    const text = JSON.stringify(line);
    expect(text).not.toContain('vg_secret');
    expect(text).not.toContain('hunter22');
    expect(text).not.toContain('vg_abc');
    expect(text).not.toContain('session=xyz');
    // Harmless fields survive.
    expect(text).toContain('a@b.example');
    expect(text).toContain('text/html');
  });
});
