/**
 * Job kinds of the notification mails and their de-duplication keys, shared by the services that
 * enqueue and the handlers the worker runs (docs/notifications.md explains the flow).
 */

/** Hourly scheduler: enqueues the next hour's tick, then one `send-digest` per due subscription. */
export const DIGEST_TICK_JOB = 'digest-tick';
/** Composes one subscriber's digest for one period and claims its delivery row. */
export const SEND_DIGEST_JOB = 'send-digest';
/** Finds the newly failing cases of a build and claims one alert delivery per subscriber. */
export const BUILD_ALERTS_JOB = 'build-alerts';
/** Hourly housekeeping run by the same tick: removes uploads no run refers to. */
export const SWEEP_UPLOADS_JOB = 'sweep-uploads';
export const sweepUploadsKey = (hour: Date): string => `sweep-uploads:${hour.toISOString()}`;
/** Sends one claimed delivery through SMTP, with retries and backoff. */
export const DELIVER_MAIL_JOB = 'deliver-mail';

/** One tick per UTC hour, whatever the number of workers or restarts. */
export const digestTickKey = (hour: Date): string => `digest-tick:${hour.toISOString()}`;
/** One digest job per subscription and period (ISO week of the local due date). */
export const sendDigestKey = (subscriptionId: string, periodKey: string): string =>
  `send-digest:${subscriptionId}:${periodKey}`;
/** One alert job per failing run on the default branch (a re-analysis keeps the same key). */
export const buildAlertsKey = (runId: string): string => `build-alerts:run:${runId}`;
/** Follow-up checks while a build still has open runs, one per build and 15-second slot. */
export const buildAlertsWaitKey = (buildId: string, slot: number): string => `build-alerts:wait:${buildId}:${slot}`;
/** One sender job per delivery row. */
export const deliverMailKey = (deliveryKey: string): string => `deliver:${deliveryKey}`;

/** Delivery-row keys (mail_deliveries.dedupe_key): the exactly-once guard of each mail. */
export const digestDeliveryKey = (subscriptionId: string, periodKey: string): string =>
  `digest:${subscriptionId}:${periodKey}`;
export const alertDeliveryKey = (subscriptionId: string, buildId: string, streakHash: string): string =>
  `alert:${subscriptionId}:${buildId}:${streakHash}`;
export const previewDeliveryKey = (subscriptionId: string, minute: string): string =>
  `preview:${subscriptionId}:${minute}`;
