import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { openSnapshots, ReadError } from '@/src/ingest';
import { longCsv, scratchDir } from './helpers';

/**
 * Whatever bytes arrive, reading ends in steps or in a ReadError: never another exception,
 * never a hang. Valid files are mutated at random (bytes replaced, inserted, deleted, lines cut
 * or repeated) and read to the end.
 */
const { write } = scratchDir();

const seedFiles = [
  longCsv(6, 3),
  'step,time,x,y,u\n0,0,0,0,1\n0,0,1,0,2\n0,0,0,1,3\n0,0,1,1,4\n1,1,0,0,1\n1,1,1,0,2\n1,1,0,1,3\n1,1,1,1,4\n',
  'x,0,0.5,1\n0.25,1,2,3\n0.75,4,5,6\n',
  'step;time;x;u\r\n0;0;0,5;1,5\r\n0;0;1,5;2,5\r\n',
];

const alphabet = [...'0123456789,.;\n\r-+eE"# \tnaNIfx', '\u0000', '\ufeff', 'é'];

type Mutation =
  | { kind: 'replace'; at: number; text: string }
  | { kind: 'insert'; at: number; text: string }
  | { kind: 'delete'; at: number; length: number }
  | { kind: 'cut'; at: number }
  | { kind: 'repeat-line'; at: number };

const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ kind: fc.constant('replace' as const), at: fc.nat(), text: fc.constantFrom(...alphabet) }),
  fc.record({
    kind: fc.constant('insert' as const),
    at: fc.nat(),
    text: fc.array(fc.constantFrom(...alphabet), { minLength: 1, maxLength: 4 }).map((a) => a.join('')),
  }),
  fc.record({ kind: fc.constant('delete' as const), at: fc.nat(), length: fc.integer({ min: 1, max: 8 }) }),
  fc.record({ kind: fc.constant('cut' as const), at: fc.nat() }),
  fc.record({ kind: fc.constant('repeat-line' as const), at: fc.nat() }),
);

function apply(text: string, m: Mutation): string {
  const at = text.length === 0 ? 0 : m.at % (text.length + 1);
  switch (m.kind) {
    case 'replace':
      return text.slice(0, at) + m.text + text.slice(at + 1);
    case 'insert':
      return text.slice(0, at) + m.text + text.slice(at);
    case 'delete':
      return text.slice(0, at) + text.slice(at + m.length);
    case 'cut':
      return text.slice(0, at);
    case 'repeat-line': {
      const lines = text.split('\n');
      const i = m.at % lines.length;
      lines.splice(i, 0, lines[i] ?? '');
      return lines.join('\n');
    }
  }
}

async function readToEnd(file: string): Promise<'steps' | 'read-error'> {
  let reader: Awaited<ReturnType<typeof openSnapshots>> | null = null;
  try {
    reader = await openSnapshots({ path: file, fileName: 'mutated.csv', limits: { maxWideLayoutBytes: 4096 } });
    for await (const step of reader.steps) {
      for (const values of Object.values(step.fields)) expect(values.length).toBeGreaterThan(0);
    }
    return 'steps';
  } catch (error) {
    if (error instanceof ReadError) return 'read-error';
    throw error;
  } finally {
    await reader?.close();
  }
}

describe('reading randomly mutated CSV', () => {
  it('always ends in steps or a ReadError', { timeout: 60_000 }, async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom(...seedFiles.keys()),
        fc.array(mutation, { minLength: 1, maxLength: 5 }),
        async (seed, mutations) => {
          const text = mutations.reduce(apply, seedFiles[seed] as string);
          const outcome = await readToEnd(write('mutated.csv', text));
          expect(['steps', 'read-error']).toContain(outcome);
        },
      ),
      { numRuns: 300, seed: 20240601 },
    );
  });
});
