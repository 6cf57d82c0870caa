/**
 * `npm run seed`: the demo data `npm start` shows. Idempotent: a second run changes nothing.
 */
import { closeDb } from '@/db/client';
import { seedDemo } from '@/src/server/services/demo';

seedDemo()
  .then(async (summary) => {
    console.log(`[seed] ${summary}`);
    await closeDb();
  })
  .catch(async (err: unknown) => {
    console.error('[seed] failed:', err);
    await closeDb();
    process.exit(1);
  });
