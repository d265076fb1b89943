/** The kinds of work the worker claims from the jobs table, each with its payload type. */
export interface JobPayloads {
  'process-clip': { clipId: number };
}
export type JobKind = keyof JobPayloads;
export const JOB_STATES = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export type JobState = (typeof JOB_STATES)[number];
