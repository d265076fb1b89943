import type { JobKind, JobState } from '../jobs';

export const USAGE_KINDS = ['source', 'preview', 'frames', 'motion', 'views', 'pairsets'] as const;
export type UsageKind = (typeof USAGE_KINDS)[number];
export type UsageByKind = Record<UsageKind, number>;

export interface UsageReport {
  disk: { usedBytes: number; freeBytes: number };
  totalBytes: number;
  /** usedBytes: sources, derived files and pairsets together; sourceBytes: the uploaded footage within it. */
  byProject: { projectId: number; name: string; usedBytes: number; sourceBytes: number; quotaBytes: number | null }[];
  byUser: { userId: number; name: string; usedBytes: number; sourceBytes: number; quotaBytes: number | null }[];
  /** From the latest reconciliation (null before the first one). */
  byKind: UsageByKind | null;
  measuredAt: string | null;
  lastDrift: Record<string, unknown> | null;
  trend: { day: string; totalBytes: number }[];
}

export interface JobSummary {
  id: number;
  kind: JobKind;
  target: string;
  clipId: number | null;
  state: JobState;
  attempts: number;
  leaseOwner: string | null;
  leaseExpiresAt: string | null;
  stage: string | null;
  progress: number;
  error: string | null;
  /** Due: when the job may run (a digest waits for its hour, a failed attempt for its backoff). */
  runAfter: string;
  createdAt: string;
  /** When the latest attempt started and ended, and its length in seconds (so far, while running). */
  startedAt: string | null;
  finishedAt: string | null;
  durationS: number | null;
  /** The worker running the job, or the one that ran its latest attempt. */
  worker: string | null;
}

export interface AuditEntry {
  id: number;
  at: string;
  actorId: number | null;
  actorName: string | null;
  action: string;
  targetType: string;
  targetId: string | null;
  detail: Record<string, unknown>;
}

/** Rejected clips that retention would purge now in one project, and the bytes that frees. */
export interface RetentionPreview {
  projectId: number;
  /** Null when retention is off for the project (then nothing is ever purged). */
  retentionDays: number | null;
  clips: { clipId: number; originalName: string; rejectedAt: string; bytes: number }[];
  totalBytes: number;
  /** Not due yet but within the longest look-ahead window, soonest first, with when each comes due. */
  upcoming: { clipId: number; originalName: string; dueAt: string; bytes: number }[];
  /** Clips and bytes coming due within each look-ahead window (7 and 30 days), not counting those due now. */
  windows: { days: number; clips: number; bytes: number }[];
}

/** The base of every link Kinefold mails, and whether an admin set it or the server derived it from its port. */
export interface PublicAddress {
  publicUrl: string;
  source: 'configured' | 'derived';
}

/** `active` beats on time; `stale` has missed its beats for a lease (its jobs pass to others); `stopped` said goodbye. */
export type WorkerPresenceState = 'active' | 'stale' | 'stopped';

/** A worker process as the Jobs screen lists it. */
export interface WorkerSummary {
  name: string;
  host: string;
  pid: number;
  version: string;
  /** Seconds of the worker's job leases; it beats every third of one. */
  leaseS: number;
  jobsRunning: number;
  startedAt: string;
  lastBeatAt: string;
  state: WorkerPresenceState;
}
