/**
 * `npm run seed`: the demo data `npm start` shows. Idempotent: a second run changes nothing.
 */
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import { closeDb } from '@/db/client';
import { seedDemo } from '@/src/server/services/demo';

// Secrets made for the demo (CI tokens, later the demo sign-ins) are written here once, for
// `npm start` to print; the directory is git-ignored.
const dataDir = path.join(import.meta.dirname, '..', '.data');
mkdirSync(dataDir, { recursive: true });

seedDemo({ notesFile: path.join(dataDir, 'demo-accounts.txt') })
  .then(async (summary) => {
    console.log(`[seed] ${summary}`);
    await closeDb();
  })
  .catch(async (err: unknown) => {
    console.error('[seed] failed:', err);
    await closeDb();
    process.exit(1);
  });
