import type { ClipState } from '../clip-states';
import type { FlagName } from '../flag-thresholds';
import type { ClipClaim, ClipVerdict } from './review';

export interface ClipProbe {
  container: string;
  codec: string;
  durationS: number;
  fps: number;
  width: number;
  height: number;
  rotation: number;
}

export interface CaptureMetadata {
  site: string;
  rig: string;
  capturedAt: string | null;
  tags: string[];
  notes: string;
}

export interface ClipSummary extends CaptureMetadata {
  id: number;
  projectId: number;
  projectName: string;
  uploaderId: number;
  uploaderName: string;
  originalName: string;
  sizeBytes: number;
  storedBytes: number;
  sha256: string;
  state: ClipState;
  stage: string | null;
  error: string | null;
  flags: string[];
  probe: ClipProbe;
  hasThumbnail: boolean;
  purgedAt: string | null;
  createdAt: string;
  updatedAt: string;
  /** Processing results (the Pipeline issue); null until the stage that measures them has run. */
  hasPreview: boolean;
  frameCount: number | null;
  cutCount: number | null;
  medianSharpness: number | null;
  meanLuma: number | null;
  flagDetails: ClipFlagDetail[];
  /** Clip-level review signals (shared/review/clip-signals.ts); motion ones null while no field exists. */
  meanMotion: number | null;
  consistentShare: number | null;
  usablePairs: number | null;
  /** The verdict in force, with its reason and comment; null until the clip is decided. */
  verdict: ClipVerdict | null;
}

export interface ClipHistoryEntry {
  at: string;
  action: string;
  actorName: string | null;
  detail: Record<string, unknown>;
}

export interface ClipDetail extends ClipSummary {
  history: ClipHistoryEntry[];
  /** Every verdict given on the clip, oldest first, changed ones included. */
  verdicts: ClipVerdict[];
  /** Someone's live review claim on the clip, or null. */
  claim: ClipClaim | null;
  /** What the signed-in person may do with this clip now. */
  can: { edit: boolean; withdraw: boolean; delete: boolean };
}

/** Why a flag was raised: what was measured, its value and the threshold it crossed, in a sentence. */
export interface ClipFlagDetail {
  flag: FlagName;
  measure: string;
  value: number;
  threshold: number;
  message: string;
  /** For `duplicate`: the other clip of the project whose frames match. */
  matchClipId?: number;
}
