import type { ClipState } from '../clip-states';
import type { DuplicateAlignment } from '../review/duplicate-steps';

export interface ComparedClip {
  id: number;
  originalName: string;
  state: ClipState;
  frameCount: number;
}

/** `GET /api/clips/:id/compare/:otherId`: both clips' frames in step, with the hash distance of each pair. */
export interface DuplicateComparison extends DuplicateAlignment {
  clip: ComparedClip;
  other: ComparedClip;
  /** The project's duplicateHashDistance: pairs at or under it count as near-identical for the flag. */
  maxDistance: number;
}
