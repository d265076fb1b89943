import type { FlagName } from '../flag-thresholds';
import type { RejectReason } from '../review/reject-reasons';
import type { VerdictDecision } from '../review/rules';

/** Who holds a clip for review, and until when (a claim no one renews is gone by itself at `expiresAt`). */
export interface ClipClaim {
  clipId: number;
  holderId: number;
  holderName: string;
  expiresAt: string;
}

/** One verdict on a clip; a changed verdict stays in the history with the time it was replaced. */
export interface ClipVerdict {
  id: number;
  decision: VerdictDecision;
  /** A reject reason's code, and its words when the verdict was given (the list may change later). */
  reason: string | null;
  reasonLabel: string | null;
  comment: string;
  curatorId: number;
  curatorName: string;
  at: string;
  /** When a later verdict replaced this one; null for the verdict in force. */
  supersededAt: string | null;
  /** Given by a bulk action rather than on the clip's own screen. */
  bulk: boolean;
}

/** A row of the review queue: what a curator needs to pick the next clip, or a batch to decide at once. */
export interface ReviewQueueItem {
  id: number;
  originalName: string;
  projectId: number;
  projectName: string;
  site: string;
  uploaderId: number;
  uploaderName: string;
  durationS: number;
  capturedAt: string | null;
  createdAt: string;
  hasThumbnail: boolean;
  flags: FlagName[];
  frameCount: number | null;
  medianSharpness: number | null;
  meanLuma: number | null;
  /** Null while no motion field exists for the clip: unavailable, not zero. */
  meanMotion: number | null;
  consistentShare: number | null;
  cutCount: number | null;
  usablePairs: number | null;
  /** Someone's live claim, or null when the clip is free. */
  claim: Omit<ClipClaim, 'clipId'> | null;
}

/** The uploaders and sites that occur in the queue now, for the queue's filter lists. */
export interface ReviewFacets {
  uploaders: { id: number; name: string; count: number }[];
  sites: { site: string; count: number }[];
}

export type BulkOutcome = 'applied' | 'skipped';

export interface BulkResult {
  clipId: number;
  outcome: BulkOutcome;
  message?: string;
}

export interface BulkResponse {
  results: BulkResult[];
}

export interface RejectReasonList {
  reasons: RejectReason[];
}
