/**
 * `npm run worker`: the background worker. Claims analysis (and later digest) jobs from the
 * PostgreSQL queue until SIGTERM/SIGINT, then finishes the job in hand and exits. Run as many as
 * you like, on any machine that reaches the database and the object store.
 */
import { closeDb } from '@/db/client';
import { env } from '@/src/server/env';
import { jobHandlers } from '@/src/server/jobs';
import { logger } from '@/src/server/logger';
import { startWorker } from '@/src/server/queue';
import { kickOffDigestScheduler } from '@/src/server/services/digests';

env(); // fail fast on a bad environment
const worker = startWorker({ handlers: jobHandlers });
logger.info({ workerId: worker.workerId, kinds: Object.keys(jobHandlers) }, 'worker started');
// The digest scheduler is a self-rescheduling hourly job; make sure this hour's tick exists.
kickOffDigestScheduler().catch((err: unknown) =>
  logger.error({ err }, 'could not start the digest scheduler; the next worker start retries'),
);

let stopping = false;
async function shutdown(signal: string): Promise<void> {
  if (stopping) return;
  stopping = true;
  logger.info({ signal }, 'worker stopping after the current job');
  await worker.stop();
  await closeDb();
  process.exit(0);
}
process.on('SIGTERM', () => void shutdown('SIGTERM'));
process.on('SIGINT', () => void shutdown('SIGINT'));
