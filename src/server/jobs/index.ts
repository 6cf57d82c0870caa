import 'server-only';
import type { JobHandler } from '../queue';
import { analyseRunJob } from './analyse-run';
import { ANALYSE_RUN_JOB } from './names';

/**
 * Every kind of background job and its handler. The worker process claims only these kinds.
 * To add a job: write its handler in this folder, register it here, enqueue it with
 * `enqueue({ kind, payload, dedupeKey })` from a service.
 */
export const jobHandlers: Record<string, JobHandler> = {
  [ANALYSE_RUN_JOB]: analyseRunJob,
};
