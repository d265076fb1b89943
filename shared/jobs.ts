/** The kinds of work the worker claims from the jobs table, each with its payload type. */
export interface JobPayloads {
  'process-clip': { clipId: number };
  /** Compares recorded bytes with the disk, fixes drift, removes strays and records the day's usage snapshot. */
  'reconcile-usage': { reason: 'scheduled' | 'on-demand' };
  /** Mails an uploader their clips rejected since their last digest; queued on a rejection, at most hourly. */
  'send-rejection-digest': { uploaderId: number };
  /** Writes a pairset's shards, pairset.json, statistics and pair-difficulty report. */
  'build-pairset': { pairsetId: number };
  /** Purges the files of a project's rejected clips older than its retention days; rows and verdicts stay. */
  'run-retention': { projectId: number };
}
export type JobKind = keyof JobPayloads;
export const JOB_STATES = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export type JobState = (typeof JOB_STATES)[number];
