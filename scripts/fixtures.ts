/**
 * `npm run fixtures`: regenerates every committed file under fixtures/ from the reference
 * schemes in src/analysis/schemes. Output is deterministic (no clock, no randomness without a
 * fixed seed), so running it twice leaves `git status` clean. Each module under
 * scripts/fixtures/ exports `generate(outDir)` and writes its own sub-folder.
 */
import { readdir } from 'node:fs/promises';
import { pathToFileURL } from 'node:url';
import path from 'node:path';

const generatorDir = path.join(import.meta.dirname, 'fixtures');
const outDir = path.join(import.meta.dirname, '..', 'fixtures');

async function main(): Promise<void> {
  const files = (await readdir(generatorDir)).filter((f) => f.endsWith('.ts')).sort();
  for (const file of files) {
    const mod = (await import(pathToFileURL(path.join(generatorDir, file)).href)) as {
      generate: (outDir: string) => Promise<string[]>;
    };
    const written = await mod.generate(outDir);
    for (const f of written) console.log(`wrote ${path.relative(process.cwd(), f)}`);
  }
}

await main();
