/**
 * `npm run bench`: runs every benchmark module under scripts/bench/ in name order (or the ones
 * named on the command line: `npm run bench -- analysis`). Each module exports `run()` and prints
 * its own figures; docs/performance.md records what they printed on the reference machine.
 * Benchmarks measure; they never fail a build. Tests never time anything.
 */
import { readdir } from 'node:fs/promises';
import { pathToFileURL } from 'node:url';
import path from 'node:path';

const benchDir = path.join(import.meta.dirname, 'bench');

async function main(): Promise<void> {
  const wanted = process.argv.slice(2);
  const files = (await readdir(benchDir)).filter((f) => f.endsWith('.ts')).sort();
  for (const file of files) {
    const name = file.replace(/\.ts$/, '');
    if (wanted.length > 0 && !wanted.includes(name)) continue;
    console.log(`\n## ${name}`);
    const mod = (await import(pathToFileURL(path.join(benchDir, file)).href)) as {
      run: () => Promise<void>;
    };
    await mod.run();
  }
}

await main();
