import type { ClipFrame } from '../../../shared/types/frames';

/** Why frame `index` has no forward motion field, in words for the screen; null when it has one. */
export function motionAbsence(frames: readonly ClipFrame[], index: number): string | null {
  const frame = frames[index];
  if (!frame || frame.motion) return null;
  const next = frames[index + 1];
  if (!next) return 'Last frame: no motion field starts here.';
  if (next.cutBefore) return 'A cut follows: no motion field spans a cut.';
  return 'Motion is not estimated yet.';
}
