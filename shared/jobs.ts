/**
 * The one table of job kinds: each kind with its payload type. Jobs are created only through the back-end core's
 * `enqueueJob(kind, payload)`, typed by this table, and the worker's handler map is keyed by it, so a job with a
 * wrong payload, or a kind without a handler, does not compile.
 */
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
  /** Converts clips stored in the original format (PNG frames, .flo fields, stored views) to the packed one. */
  'compact-storage': { reason: 'upgrade' | 'on-demand' };
  /** k-means over the moment descriptors of a clustering's projects; writes its clusters and assignments. */
  'cluster-moments': { clusteringId: number };
}
export type JobKind = keyof JobPayloads;
/** Any kind's payload; a row's kind says which (the worker's claim pairs them). */
export type JobPayload = JobPayloads[JobKind];

/** The columns a job of each kind links to, so the Jobs screen and cancellations can find a clip's or pairset's jobs. */
export const JOB_TARGETS: {
  [K in JobKind]: (payload: JobPayloads[K]) => { clipId: number | null; pairsetId: number | null };
} = {
  'process-clip': ({ clipId }) => ({ clipId, pairsetId: null }),
  'reconcile-usage': () => ({ clipId: null, pairsetId: null }),
  'send-rejection-digest': () => ({ clipId: null, pairsetId: null }),
  'build-pairset': ({ pairsetId }) => ({ clipId: null, pairsetId }),
  'run-retention': () => ({ clipId: null, pairsetId: null }),
  'compact-storage': () => ({ clipId: null, pairsetId: null }),
  'cluster-moments': () => ({ clipId: null, pairsetId: null }),
};

export const JOB_STATES = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export type JobState = (typeof JOB_STATES)[number];
