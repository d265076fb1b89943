/**
 * The camera's global shift between two small grey pictures: the whole-pixel (dx, dy) that minimises the mean
 * absolute difference |prev(x) − next(x + d)| over the overlap of the two pictures (block matching with one block
 * the size of the frame, searched coarse to fine; common practice). It brings a fast pan or shake within reach of a
 * coarse Farnebäck field, which alone follows only a few pixels a level. Foliage repeats itself, so the search at
 * half size keeps its few best shifts and each is refined at full size before one is chosen.
 */
import { resizeArea } from '../../shared/pairing/area-resize';

/** Overlaps smaller than this share of the picture are not tried: too few pixels to compare. */
const MIN_OVERLAP_SHARE = 0.35;
/** Largest shift tried, as a share of each side (a fifth of the width a sampled frame is a very fast pan). */
const MAX_SHIFT_SHARE = 0.35;
/** Shifts of the half-size search refined at full size. */
const CANDIDATES = 3;
/** Full-size pixels searched around each refined candidate. */
const REFINE_RADIUS = 1;

export interface GlobalShift {
  dx: number;
  dy: number;
  /** Mean absolute difference over the overlap at this shift. */
  error: number;
}

/** Mean |prev(x) − next(x + (dx, dy))| over the overlap; Infinity when the overlap is too small. */
export function shiftError(
  prev: Float32Array,
  next: Float32Array,
  width: number,
  height: number,
  dx: number,
  dy: number,
): number {
  const x0 = Math.max(0, -dx);
  const x1 = Math.min(width, width - dx);
  const y0 = Math.max(0, -dy);
  const y1 = Math.min(height, height - dy);
  const overlap = (x1 - x0) * (y1 - y0);
  if (x1 <= x0 || y1 <= y0 || overlap < MIN_OVERLAP_SHARE * width * height) return Infinity;
  let error = 0;
  for (let y = y0; y < y1; y += 1) {
    const row = y * width;
    const shifted = (y + dy) * width + dx;
    for (let x = x0; x < x1; x += 1) error += Math.abs(prev[row + x] - next[shifted + x]);
  }
  return error / overlap;
}

/** Every shift within `radius` of (cx, cy), best first; ties go to the smaller shift, so flat reads as still. */
function searchAround(
  prev: Float32Array,
  next: Float32Array,
  width: number,
  height: number,
  cx: number,
  cy: number,
  rx: number,
  ry: number,
): GlobalShift[] {
  const tried: GlobalShift[] = [];
  for (let dy = cy - ry; dy <= cy + ry; dy += 1) {
    for (let dx = cx - rx; dx <= cx + rx; dx += 1) {
      const error = shiftError(prev, next, width, height, dx, dy);
      if (Number.isFinite(error)) tried.push({ dx, dy, error });
    }
  }
  return tried.sort((a, b) => a.error - b.error || a.dx ** 2 + a.dy ** 2 - (b.dx ** 2 + b.dy ** 2));
}

/** The best shift within `radius` of (dx, dy), at full size; null when no overlap there is large enough. */
export function shiftNear(
  prev: Float32Array,
  next: Float32Array,
  width: number,
  height: number,
  dx: number,
  dy: number,
  radius: number,
): GlobalShift | null {
  return searchAround(prev, next, width, height, dx, dy, radius, radius)[0] ?? null;
}

export function globalShift(prev: Float32Array, next: Float32Array, width: number, height: number): GlobalShift {
  if (prev.length !== width * height || next.length !== prev.length) {
    throw new RangeError(`pictures do not match ${width}×${height}`);
  }
  const halfWidth = Math.max(1, Math.round(width / 2));
  const halfHeight = Math.max(1, Math.round(height / 2));
  const scaleX = width / halfWidth;
  const scaleY = height / halfHeight;
  const smallPrev = resizeArea(prev, width, height, halfWidth, halfHeight);
  const smallNext = resizeArea(next, width, height, halfWidth, halfHeight);
  const coarse = searchAround(
    smallPrev,
    smallNext,
    halfWidth,
    halfHeight,
    0,
    0,
    Math.floor(halfWidth * MAX_SHIFT_SHARE),
    Math.floor(halfHeight * MAX_SHIFT_SHARE),
  );
  const kept: GlobalShift[] = [];
  for (const shift of coarse) {
    if (kept.length === CANDIDATES) break;
    // A neighbour of a kept shift is the same valley, not another candidate.
    if (kept.some((k) => Math.abs(k.dx - shift.dx) <= 1 && Math.abs(k.dy - shift.dy) <= 1)) continue;
    kept.push(shift);
  }
  let best: GlobalShift = { dx: 0, dy: 0, error: shiftError(prev, next, width, height, 0, 0) };
  for (const candidate of kept) {
    const refined = searchAround(
      prev,
      next,
      width,
      height,
      Math.round(candidate.dx * scaleX),
      Math.round(candidate.dy * scaleY),
      REFINE_RADIUS,
      REFINE_RADIUS,
    )[0];
    if (refined && refined.error < best.error) best = refined;
  }
  return best;
}
