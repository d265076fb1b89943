/**
 * Evidence of a cut between two neighbouring sampled frames, beside the histogram distance of cuts.ts:
 * - edge change: the edge change ratio of R. Zabih, J. Miller, K. Mai, "A feature-based algorithm for detecting
 *   and classifying scene breaks", ACM Multimedia 1995: ECR = max(X_in / σ_next, X_out / σ_prev), σ the edge pixels
 *   of a frame, X_in the edge pixels of the next frame farther than r from any edge of the previous one, X_out the
 *   reverse. Edges here are Sobel magnitudes above a fixed level on a small copy of the frame, not Canny's; the
 *   level and r are Kinefold's choices (common practice).
 * - the motion's verdict: the camera's global shift (global-shift.ts) and, where the shift alone leaves a large
 *   error, a coarse Farnebäck field each way started from it on an even smaller copy: its forward–backward
 *   consistent share (consistency.ts, Sundaram, Brox & Keutzer, ECCV 2010) and its warp error, the mean absolute
 *   difference between the first frame and the second warped back by the field, over the mean absolute deviation
 *   of the two frames. Motion within a shot, even fast, is explained at the coarse scale: consistent, small
 *   warp error; across a cut no field explains it: consistency collapses and the warp error nears that of two
 *   unrelated pictures (about 1.1 for independent values of one distribution, more for different ones).
 * Small copies are area averages (resizeArea), so compression noise and fine texture average out.
 */
import { resizeArea } from '../../shared/pairing/area-resize';
import { forwardBackwardConsistency } from '../motion/fields/consistency';
import { estimateFarneback, FARNEBACK_DEFAULTS, type FarnebackParams } from '../motion/farneback/farneback';
import { warpBackward } from '../motion/kernels/resample';
import { globalShift, shiftNear } from './global-shift';
import { MotionWorkspace } from '../motion/kernels/workspace';

/** Longest side of the copy the coarse motion runs on: a 320 px frame's motion shrinks fivefold. */
export const MOTION_LONG_SIDE = 64;
/** Longest side of the copy whose edges are compared. */
export const EDGE_LONG_SIDE = 160;
/** Sobel magnitude (|gx| + |gy| on grey 0..255) from which a pixel counts as an edge. */
const EDGE_MIN_GRADIENT = 120;
/** Edge pixels within this many pixels (Chebyshev distance) of an edge of the other frame count as kept. */
const EDGE_RADIUS = 1;
/** An edge-free frame (black, flat) has no edges to lose: its ratio counts from this many edge pixels. */
const MIN_EDGE_PIXELS = 1;
/** A pair whose field leaves less than this share of the first frame inside the second is not judged. */
const MIN_INSIDE_SHARE = 0.25;
/** The warp error of a pair not judged: that of unrelated pictures. */
const UNJUDGED_WARP_ERROR = 1;
/**
 * Warp error of the global shift alone up to which a pair counts as explained without a field (well below the
 * lowest level at which the warp error fires, cut-decision.ts), which spares the two fields for most pairs.
 */
const SHIFT_EXPLAINS = 0.25;
/**
 * A quiet pair, the same picture moved a little: its histogram distance and its edge change after the last pair's
 * shift are under about half the floors from which they count (cut-decision.ts: 0.02 and 0.15), and that shift
 * leaves a warp error under the one that makes a cut on its own (0.6). On these figures the decision cannot make
 * the pair a cut, so the full shift search and the two fields are spared, and the shift's warp error stands for
 * the pair: a little above what the fields leave in footage the shift explains (0.47–0.54 against 0.44–0.48 over
 * the pipeline benchmark's pan), which only raises its neighbours' local level a little. A cut between shots of
 * one scene or one colour keeps a histogram as quiet, but not its edges: 0.15–0.17 at the generated set's jump and
 * similar-colour cuts, against 0.04 and less over panning footage.
 */
const QUIET = Object.freeze({ histogramDistance: 0.01, edgeChange: 0.08, warpError: 0.6 });
/** Coarse pixels around the last pair's shift searched before a full search. */
const HINT_RADIUS = 2;
/** Below this mean deviation (grey levels) a frame is flat: the warp error divides by this instead. */
const MIN_SPREAD = 2;
/**
 * Farnebäck for a picture 64 px wide, started from the global shift, so it only follows what the shift leaves
 * (zoom, turn, parallax): three levels, a 9 px window that keeps the coarsest level (16 px) meaningful, and two
 * iterations a level (OpenCV's default is 3), which halves its cost.
 */
const COARSE_FARNEBACK: Readonly<FarnebackParams> = Object.freeze({
  ...FARNEBACK_DEFAULTS,
  winSize: 9,
  levels: 3,
  iterations: 2,
});

/** A frame reduced to what cut detection compares. */
export interface CutThumb {
  width: number;
  height: number;
  /**
   * Grey 0..255 at width × height (MOTION_LONG_SIDE), rounded to bytes: a clip's thumbs are held together while its
   * cuts are decided, so they are kept small (about 5 KB a frame with the packed edges).
   */
  grey: Uint8Array;
  /** Mean absolute deviation of `grey` from its mean. */
  spread: number;
  edgeWidth: number;
  edgeHeight: number;
  /** The edge map at edgeWidth × edgeHeight (EDGE_LONG_SIDE), 8 pixels a byte (packEdges). */
  edges: Uint8Array;
}

export interface PairEvidence {
  /** Edge change ratio, 0 (the same edges) to 1 (none kept). */
  edgeChange: number;
  /** Forward–backward consistent share of the coarse fields, 0..1; null when the global shift explained the pair. */
  motionConsistency: number | null;
  /** Mean |first − second warped back| over the frames' mean deviation; about 0 when motion explains the pair. */
  warpError: number;
  /** The camera's global shift found (coarse pixels), a hint for the next pair. */
  shift: { dx: number; dy: number };
}

function scaledSize(width: number, height: number, longSide: number): { width: number; height: number } {
  const scale = Math.min(1, longSide / Math.max(width, height));
  return { width: Math.max(1, Math.round(width * scale)), height: Math.max(1, Math.round(height * scale)) };
}

export function cutThumb(grey: Float32Array, width: number, height: number): CutThumb {
  const edgeSize = scaledSize(width, height, EDGE_LONG_SIDE);
  const forEdges = shrink(grey, width, height, edgeSize.width, edgeSize.height);
  // The motion copy is made from the edge copy: a quarter of the pixels to average.
  const small = scaledSize(width, height, MOTION_LONG_SIDE);
  const coarse = shrink(forEdges, edgeSize.width, edgeSize.height, small.width, small.height);
  return {
    ...small,
    grey: Uint8Array.from(coarse, Math.round),
    spread: meanDeviation(coarse),
    edgeWidth: edgeSize.width,
    edgeHeight: edgeSize.height,
    edges: packEdges(sobelEdges(forEdges, edgeSize.width, edgeSize.height)),
  };
}

/**
 * Area average to a smaller size; halving (the default 320 px working size gives 160 and 80) takes a direct 2×2
 * mean, the same numbers as resizeArea's, at a fraction of its cost.
 */
function shrink(src: Float32Array, width: number, height: number, outWidth: number, outHeight: number): Float32Array {
  if (outWidth * 2 !== width || outHeight * 2 !== height) return resizeArea(src, width, height, outWidth, outHeight);
  const out = new Float32Array(outWidth * outHeight);
  for (let y = 0; y < outHeight; y += 1) {
    const top = 2 * y * width;
    const bottom = top + width;
    for (let x = 0; x < outWidth; x += 1) {
      const left = 2 * x;
      out[y * outWidth + x] =
        (src[top + left]! + src[top + left + 1]! + src[bottom + left]! + src[bottom + left + 1]!) / 4;
    }
  }
  return out;
}

/** An edge map of 0s and 1s, 8 pixels a byte, first pixel in the lowest bit. */
export function packEdges(edges: Uint8Array): Uint8Array {
  const packed = new Uint8Array(Math.ceil(edges.length / 8));
  for (let p = 0; p < edges.length; p += 1) if (edges[p]) packed[p >> 3]! |= 1 << (p & 7);
  return packed;
}

export function unpackEdges(packed: Uint8Array, pixels: number): Uint8Array {
  const edges = new Uint8Array(pixels);
  for (let p = 0; p < pixels; p += 1) edges[p] = (packed[p >> 3]! >> (p & 7)) & 1;
  return edges;
}

function meanDeviation(values: Float32Array): number {
  let sum = 0;
  for (const value of values) sum += value;
  const mean = sum / values.length;
  let deviation = 0;
  for (const value of values) deviation += Math.abs(value - mean);
  return deviation / values.length;
}

/**
 * Thin edges: pixels whose 3×3 Sobel magnitude |gx| + |gy| reaches EDGE_MIN_GRADIENT and is the largest of its
 * two neighbours across the edge (Canny's non-maximum suppression, directions in 45° steps, without hysteresis).
 * The border row and column are never edges.
 */
export function sobelEdges(grey: Float32Array, width: number, height: number): Uint8Array {
  const magnitude = new Float32Array(width * height);
  const direction = new Uint8Array(width * height);
  for (let y = 1; y < height - 1; y += 1) {
    for (let x = 1; x < width - 1; x += 1) {
      const p = y * width + x;
      const gx =
        grey[p - width + 1] +
        2 * grey[p + 1] +
        grey[p + width + 1] -
        grey[p - width - 1] -
        2 * grey[p - 1] -
        grey[p + width - 1];
      const gy =
        grey[p + width - 1] +
        2 * grey[p + width] +
        grey[p + width + 1] -
        grey[p - width - 1] -
        2 * grey[p - width] -
        grey[p - width + 1];
      magnitude[p] = Math.abs(gx) + Math.abs(gy);
      direction[p] = gradientDirection(gx, gy);
    }
  }
  const steps = [1, width + 1, width, width - 1];
  const edges = new Uint8Array(width * height);
  for (let y = 1; y < height - 1; y += 1) {
    for (let x = 1; x < width - 1; x += 1) {
      const p = y * width + x;
      const m = magnitude[p];
      const step = steps[direction[p]];
      edges[p] = m >= EDGE_MIN_GRADIENT && m >= magnitude[p - step] && m > magnitude[p + step] ? 1 : 0;
    }
  }
  return edges;
}

/** The gradient's direction in 45° steps: 0 along x, 1 the diagonal down-right, 2 along y, 3 down-left. */
function gradientDirection(gx: number, gy: number): number {
  const ax = Math.abs(gx);
  const ay = Math.abs(gy);
  // tan 22.5° ≈ 0.4142
  if (ay <= 0.4142 * ax) return 0;
  if (ax <= 0.4142 * ay) return 2;
  return gx > 0 === gy > 0 ? 1 : 3;
}

/** Each pixel within `radius` (a square) of an edge: the dilation of Zabih et al. */
function dilate(edges: Uint8Array, width: number, height: number, radius: number): Uint8Array {
  const rows = new Uint8Array(edges.length);
  for (let y = 0; y < height; y += 1) {
    const row = y * width;
    for (let x = 0; x < width; x += 1) {
      const from = x > radius ? x - radius : 0;
      const to = x + radius < width ? x + radius : width - 1;
      let hit = 0;
      for (let i = from; i <= to; i += 1) hit |= edges[row + i]!;
      rows[row + x] = hit;
    }
  }
  const out = new Uint8Array(edges.length);
  for (let y = 0; y < height; y += 1) {
    const from = y > radius ? y - radius : 0;
    const to = y + radius < height ? y + radius : height - 1;
    for (let x = 0; x < width; x += 1) {
      let hit = 0;
      for (let i = from; i <= to; i += 1) hit |= rows[i * width + x]!;
      out[y * width + x] = hit;
    }
  }
  return out;
}

/**
 * The edge change ratio of Zabih, Miller & Mai between two edge maps of one size, after moving the second back by
 * the camera's global shift (they register the frames first too): an edge of the first frame at x is kept when the
 * second has one near x + shift. Edges whose counterpart would lie outside the other frame are left out.
 */
export function edgeChangeRatio(
  prev: Uint8Array,
  next: Uint8Array,
  width: number,
  height: number,
  shift = { dx: 0, dy: 0 },
): number {
  if (prev.length !== width * height || next.length !== prev.length) {
    throw new RangeError(`edge maps do not match ${width}×${height}`);
  }
  const prevNear = dilate(prev, width, height, EDGE_RADIUS);
  const nextNear = dilate(next, width, height, EDGE_RADIUS);
  let prevCount = 0;
  let nextCount = 0;
  let leaving = 0;
  let entering = 0;
  for (let y = 0; y < height; y += 1) {
    for (let x = 0; x < width; x += 1) {
      const p = y * width + x;
      const fx = x + shift.dx;
      const fy = y + shift.dy;
      if (prev[p] && fx >= 0 && fx < width && fy >= 0 && fy < height) {
        prevCount += 1;
        if (!nextNear[fy * width + fx]) leaving += 1;
      }
      const bx = x - shift.dx;
      const by = y - shift.dy;
      if (next[p] && bx >= 0 && bx < width && by >= 0 && by < height) {
        nextCount += 1;
        if (!prevNear[by * width + bx]) entering += 1;
      }
    }
  }
  if (prevCount === 0 && nextCount === 0) return 0;
  return Math.max(entering / Math.max(MIN_EDGE_PIXELS, nextCount), leaving / Math.max(MIN_EDGE_PIXELS, prevCount));
}

/**
 * The edge change between two thumbs after moving the second back by `shift` (coarse pixels), measured on the
 * edge maps' finer grid.
 */
function edgeChangeAt(prev: CutThumb, next: CutThumb, shift: { dx: number; dy: number }): number {
  const edgePixels = prev.edgeWidth * prev.edgeHeight;
  return edgeChangeRatio(
    unpackEdges(prev.edges, edgePixels),
    unpackEdges(next.edges, edgePixels),
    prev.edgeWidth,
    prev.edgeHeight,
    {
      dx: Math.round(shift.dx * (prev.edgeWidth / prev.width)),
      dy: Math.round(shift.dy * (prev.edgeHeight / prev.height)),
    },
  );
}

/**
 * The motion's verdict and the edge change between two thumbs of one clip. `hint` is the last pair's shift;
 * `histogramDistance`, when given, lets a quiet pair (QUIET) skip the full shift search and the fields.
 */
export function pairEvidence(
  prev: CutThumb,
  next: CutThumb,
  workspace = new MotionWorkspace(),
  hint: { dx: number; dy: number } | null = null,
  histogramDistance: number | null = null,
): PairEvidence {
  if (prev.width !== next.width || prev.height !== next.height) {
    throw new RangeError(`thumbs differ in size: ${prev.width}×${prev.height} and ${next.width}×${next.height}`);
  }
  const { width, height } = prev;
  const pixels = width * height;
  const prevGrey = workspace.float32('cut.prevGrey', pixels);
  const nextGrey = workspace.float32('cut.nextGrey', pixels);
  prevGrey.set(prev.grey);
  nextGrey.set(next.grey);
  const spread = Math.max(MIN_SPREAD, (prev.spread + next.spread) / 2);
  // Within a shot the camera's shift changes little from pair to pair: the last one (or none, for a first pair),
  // if it explains this pair too, spares the full search.
  const near = shiftNear(prevGrey, nextGrey, width, height, hint?.dx ?? 0, hint?.dy ?? 0, HINT_RADIUS);
  const nearEdgeChange =
    near && histogramDistance !== null && histogramDistance < QUIET.histogramDistance
      ? edgeChangeAt(prev, next, near)
      : null;
  if (near && nearEdgeChange !== null && nearEdgeChange < QUIET.edgeChange && near.error / spread < QUIET.warpError) {
    return { edgeChange: nearEdgeChange, motionConsistency: null, warpError: near.error / spread, shift: near };
  }
  const shift = near && near.error / spread <= SHIFT_EXPLAINS ? near : globalShift(prevGrey, nextGrey, width, height);
  const sameShift = near !== null && near.dx === shift.dx && near.dy === shift.dy;
  const edgeChange = sameShift && nearEdgeChange !== null ? nearEdgeChange : edgeChangeAt(prev, next, shift);
  // Most pairs of a shot are explained by the camera's shift alone: no field is needed to say so.
  if (shift.error / spread <= SHIFT_EXPLAINS) {
    return { edgeChange, motionConsistency: null, warpError: shift.error / spread, shift };
  }
  const forward = shiftedField(prevGrey, nextGrey, width, height, shift, workspace, 'cut.forward');
  const backward = shiftedField(
    nextGrey,
    prevGrey,
    width,
    height,
    { dx: -shift.dx, dy: -shift.dy },
    workspace,
    'cut.backward',
  );
  const { mask } = forwardBackwardConsistency(forward, backward, width, height, undefined, new Uint8Array(pixels));
  const warped = workspace.float32('cut.warped', pixels);
  warpBackward(nextGrey, width, height, forward, warped);
  let inside = 0;
  let consistent = 0;
  let error = 0;
  for (let y = 0; y < height; y += 1) {
    for (let x = 0; x < width; x += 1) {
      const p = y * width + x;
      const tx = x + forward[2 * p];
      const ty = y + forward[2 * p + 1];
      if (!(tx >= 0 && tx <= width - 1 && ty >= 0 && ty <= height - 1)) continue;
      inside += 1;
      consistent += mask[p];
      error += Math.abs(prevGrey[p]! - warped[p]!);
    }
  }
  const judged = inside >= MIN_INSIDE_SHARE * pixels;
  return {
    edgeChange,
    motionConsistency: judged ? consistent / inside : 0,
    warpError: judged ? error / inside / spread : UNJUDGED_WARP_ERROR,
    shift,
  };
}

/**
 * The Farnebäck field from `from` to `to` started from a global shift: `to` is moved back by the shift, the field
 * of the remainder is estimated, and the shift is added to it.
 */
function shiftedField(
  from: Float32Array,
  to: Float32Array,
  width: number,
  height: number,
  shift: { dx: number; dy: number },
  workspace: MotionWorkspace,
  key: string,
): Float32Array {
  const pixels = width * height;
  const moved = workspace.float32('cut.moved', pixels);
  for (let y = 0; y < height; y += 1) {
    const sy = Math.min(height - 1, Math.max(0, y + shift.dy));
    for (let x = 0; x < width; x += 1) {
      moved[y * width + x] = to[sy * width + Math.min(width - 1, Math.max(0, x + shift.dx))];
    }
  }
  const field = estimateFarneback(
    from,
    moved,
    width,
    height,
    COARSE_FARNEBACK,
    workspace,
    workspace.float32(key, 2 * pixels),
  );
  for (let p = 0; p < pixels; p += 1) {
    field[2 * p] += shift.dx;
    field[2 * p + 1] += shift.dy;
  }
  return field;
}
