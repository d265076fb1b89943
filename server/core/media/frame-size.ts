import type { FrameSize } from './ffmpeg';

/**
 * The working size of a clip's frames: the longest side of the upright picture (rotation applied) becomes the
 * project's working size, the other keeps the aspect ratio. Both are rounded to even pixels because H.264 with
 * 4:2:0 chroma (the preview) needs even sides, and frames and preview share one size.
 */
export function workingFrameSize(width: number, height: number, rotation: number, workingSize: number): FrameSize {
  const quarterTurn = ((rotation % 180) + 180) % 180 === 90;
  const [uprightWidth, uprightHeight] = quarterTurn ? [height, width] : [width, height];
  const scale = workingSize / Math.max(uprightWidth, uprightHeight);
  return { width: even(uprightWidth * scale), height: even(uprightHeight * scale) };
}

function even(value: number): number {
  return Math.max(2, 2 * Math.round(value / 2));
}
