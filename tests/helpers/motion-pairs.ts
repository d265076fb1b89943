// Frame pairs with known motion for the motion-estimation tests: a seeded, multi-octave value-noise texture
// evaluated at continuous positions, so the second frame is the texture moved by an exact warp (shift, rotation,
// zoom) with no interpolation error, and the ground-truth field is that warp.
// Value noise: random values on an integer lattice blended with the quintic fade 6t⁵ − 15t⁴ + 10t³
// (K. Perlin, "Improving Noise", SIGGRAPH 2002), summed over octaves (common practice).

export interface MotionPair {
  width: number;
  height: number;
  /** First frame, grey levels 0..255 rounded to integers like an 8-bit frame. */
  prev: Float32Array;
  /** Second frame. */
  next: Float32Array;
  /** Ground truth from prev to next, interleaved (u, v): prev(x) = next(x + truth(x)). */
  truth: Float32Array;
}

export type Warp =
  { kind: 'shift'; dx: number; dy: number } | { kind: 'rotate'; degrees: number } | { kind: 'zoom'; factor: number };

// Octave cell sizes in pixels, coarse to fine, and the amplitude ratio between octaves.
const OCTAVE_CELLS = [48, 24, 12, 6, 3.5];
const PERSISTENCE = 0.6;
const GREY_LEVELS = 255;

function latticeValue(ix: number, iy: number, seed: number): number {
  // A 32-bit integer hash (multiply–xorshift) of the lattice point: deterministic on every platform.
  let h = Math.imul(ix, 0x27d4eb2d) ^ Math.imul(iy, 0x165667b1) ^ Math.imul(seed, 0x9e3779b1);
  h = Math.imul(h ^ (h >>> 15), 0x85ebca6b);
  h = Math.imul(h ^ (h >>> 13), 0xc2b2ae35);
  h ^= h >>> 16;
  return (h >>> 0) / 0x100000000;
}

function fade(t: number): number {
  return t * t * t * (t * (t * 6 - 15) + 10);
}

function valueNoise(x: number, y: number, seed: number): number {
  const ix = Math.floor(x);
  const iy = Math.floor(y);
  const fx = fade(x - ix);
  const fy = fade(y - iy);
  const top = latticeValue(ix, iy, seed) * (1 - fx) + latticeValue(ix + 1, iy, seed) * fx;
  const bottom = latticeValue(ix, iy + 1, seed) * (1 - fx) + latticeValue(ix + 1, iy + 1, seed) * fx;
  return top * (1 - fy) + bottom * fy;
}

/** The texture at a continuous position: grey level in [0, 255]. */
export function texture(x: number, y: number, seed: number): number {
  let sum = 0;
  let amplitude = 1;
  let total = 0;
  for (let o = 0; o < OCTAVE_CELLS.length; o++) {
    sum += amplitude * valueNoise(x / OCTAVE_CELLS[o], y / OCTAVE_CELLS[o], seed * OCTAVE_CELLS.length + o);
    total += amplitude;
    amplitude *= PERSISTENCE;
  }
  return (sum / total) * GREY_LEVELS;
}

/** Where the content at pixel (x, y) of the first frame is in the second frame. */
function forwardPoint(warp: Warp, x: number, y: number, cx: number, cy: number): [number, number] {
  switch (warp.kind) {
    case 'shift':
      return [x + warp.dx, y + warp.dy];
    case 'rotate': {
      const a = (warp.degrees * Math.PI) / 180;
      const rx = x - cx;
      const ry = y - cy;
      return [cx + Math.cos(a) * rx - Math.sin(a) * ry, cy + Math.sin(a) * rx + Math.cos(a) * ry];
    }
    case 'zoom':
      return [cx + (x - cx) * warp.factor, cy + (y - cy) * warp.factor];
  }
}

/** Where the second frame's pixel (x, y) came from in the texture (the inverse warp). */
function backwardPoint(warp: Warp, x: number, y: number, cx: number, cy: number): [number, number] {
  switch (warp.kind) {
    case 'shift':
      return [x - warp.dx, y - warp.dy];
    case 'rotate':
      return forwardPoint({ kind: 'rotate', degrees: -warp.degrees }, x, y, cx, cy);
    case 'zoom':
      return [cx + (x - cx) / warp.factor, cy + (y - cy) / warp.factor];
  }
}

/** A pair of width × height frames whose motion is `warp` about the frame centre. */
export function makeMotionPair(width: number, height: number, warp: Warp, seed = 1): MotionPair {
  const prev = new Float32Array(width * height);
  const next = new Float32Array(width * height);
  const truth = new Float32Array(2 * width * height);
  const cx = (width - 1) / 2;
  const cy = (height - 1) / 2;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const p = y * width + x;
      prev[p] = Math.round(texture(x, y, seed));
      const [sx, sy] = backwardPoint(warp, x, y, cx, cy);
      next[p] = Math.round(texture(sx, sy, seed));
      const [fx, fy] = forwardPoint(warp, x, y, cx, cy);
      truth[2 * p] = fx - x;
      truth[2 * p + 1] = fy - y;
    }
  }
  return { width, height, prev, next, truth };
}
