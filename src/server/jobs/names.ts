/** Job kinds and their de-duplication keys, shared by the services that enqueue and the worker. */
export const ANALYSE_RUN_JOB = 'analyse-run';

/** One analysis job per run: enqueueing twice (a retried request) keeps one. */
export const analyseJobKey = (runId: string): string => `analyse:${runId}`;
