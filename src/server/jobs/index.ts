import 'server-only';
import type { JobHandler } from '../queue';
import { analyseRunJob } from './analyse-run';
import { ANALYSE_RUN_JOB } from './names';
import {
  BUILD_ALERTS_JOB,
  DELIVER_MAIL_JOB,
  DIGEST_TICK_JOB,
  SEND_DIGEST_JOB,
  SWEEP_UPLOADS_JOB,
} from './notification-names';
import { sweepUploadsJob } from './sweep-uploads';
import { buildAlertsJob, deliverMailJob, digestTickJob, sendDigestJob } from './notifications';

/**
 * Every kind of background job and its handler. The worker process claims only these kinds.
 * To add a job: write its handler in this folder, register it here, enqueue it with
 * `enqueue({ kind, payload, dedupeKey })` from a service.
 */
export const jobHandlers: Record<string, JobHandler> = {
  [ANALYSE_RUN_JOB]: analyseRunJob,
  [DIGEST_TICK_JOB]: digestTickJob,
  [SEND_DIGEST_JOB]: sendDigestJob,
  [SWEEP_UPLOADS_JOB]: sweepUploadsJob,
  [BUILD_ALERTS_JOB]: buildAlertsJob,
  [DELIVER_MAIL_JOB]: deliverMailJob,
};
