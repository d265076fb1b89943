// Patch inverse search, the first step of DIS on each pyramid level: every patch of the grid finds the
// displacement that best matches it in the second frame by inverse-compositional Lucas–Kanade (Gauss–Newton
// with the first frame's gradients, so the tensor is fixed per patch), starting from the coarser level's field.
// Sources: T. Kroeger, R. Timofte, D. Dai, L. Van Gool, "Fast Optical Flow using Dense Inverse Search", ECCV
// 2016; S. Baker, I. Matthews, "Lucas-Kanade 20 Years On: A Unifying Framework", IJCV 56(3), 2004
// (the inverse-compositional update). As in OpenCV's DISOpticalFlow (video/src/dis_flow.cpp), the grid is
// swept twice, forward then backward, each sweep with half the iterations, and before descending a patch also
// tries the vectors of its already-visited neighbours (spatial propagation); a result more than a patch side
// away from its start is discarded. Unlike OpenCV, the step is the full Gauss–Newton step on unit-gain gradients
// (the authors' code scales its Sobel by 1/8 too), a step that makes the distance grow is undone, descent stops
// at steps under MIN_STEP, and the second sweep leaves a patch that settled alone unless a neighbour's vector fits
// it better. Without the undo the full steps overshoot (measured: AEE 1.64 instead of 0.69 px on the large-motion
// pair of dis.test.ts); the other two only save patch evaluations.

import { PATCH_TERMS, type PatchGrid } from './patch-grid.js';

// Descent stops once a step is shorter than this (pixels of the level): further steps change little.
const MIN_STEP = 0.01;
// Neighbours' vectors closer than this to a patch's start (pixels) are not tried.
const MIN_CANDIDATE_DISTANCE = 0.05;

export interface SearchFrames {
  width: number;
  height: number;
  /** First frame at this level with its gradients: I, ∂I/∂x, ∂I/∂y per pixel (dis-levels.ts patchSource). */
  source: Float32Array;
  /** Second frame with `border` replicated pixels on every side (at least the patch size). */
  paddedNext: Float32Array;
  border: number;
}

/** Where a patch lands in the padded second frame and its bilinear weights. */
export interface Landing {
  at: number;
  fx: number;
  fy: number;
}

/**
 * Places a patch of side `size` at (x0, y0) moved by (u, v), keeping at least one of its pixels inside the frame
 * (OpenCV's limits; the border supplies the rest).
 */
export function land(
  frames: SearchFrames,
  size: number,
  x0: number,
  y0: number,
  u: number,
  v: number,
  out: Landing,
): void {
  const { width, height, border } = frames;
  let sx = x0 + u;
  let sy = y0 + v;
  sx = sx < 1 - size ? 1 - size : sx > width - 1 ? width - 1 : sx;
  sy = sy < 1 - size ? 1 - size : sy > height - 1 ? height - 1 : sy;
  const ix = Math.floor(sx);
  const iy = Math.floor(sy);
  out.at = (iy + border) * (width + 2 * border) + ix + border;
  out.fx = sx - ix;
  out.fy = sy - iy;
}

/** Small buffers for the search: `line` holds at least `size` doubles, `step` 2. */
export interface SearchScratch {
  line: Float64Array;
  step: Float64Array;
}

/** The sparse field a search fills, one entry per patch in row order, with what is known of each vector. */
export interface PatchVectors {
  u: Float32Array;
  v: Float32Array;
  /** The patch distance at the vector, or NaN when it was not evaluated there. */
  distance: Float32Array;
  /** 1 when the descent stopped at a minimum (a step too short or one that made the match worse), else 0. */
  settled: Float32Array;
}

interface Search {
  frames: SearchFrames;
  size: number;
  meanNormalised: boolean;
  terms: Float32Array;
  perSweep: number;
  /** Where matchPatch compares: set by land. */
  landing: Landing;
  line: Float64Array;
  /** matchPatch's results: the right-hand side of the Gauss–Newton step, and the distance. */
  step: Float64Array;
  distance: number;
}

/**
 * Compares patch s, top-left (x0, y0), of the first frame with the second frame at search.landing, bilinear.
 * Writes the sum of squared differences (with mean normalisation, after removing the mean difference) into
 * search.distance and Σ d·∇I (mean-normalised: Σ (d − mean d)·∇I) into search.step: the right-hand side of the
 * Gauss–Newton step. The results go through the search object rather than arguments and a return value: this
 * function is too large to be inlined, and passing doubles to it would allocate a number object each time.
 */
function matchPatch(search: Search, s: number, x0: number, y0: number): void {
  const { frames, size, landing, line, step } = search;
  const { source, paddedNext: next, width } = frames;
  const stride = width + 2 * frames.border;
  const { fx, fy } = landing;
  let at = landing.at;
  // Each row of the second frame is interpolated along x once and serves two output rows.
  let left = next[at];
  for (let c = 0; c < size; c++) {
    const right = next[at + c + 1];
    line[c] = left + fx * (right - left);
    left = right;
  }
  // Even and odd columns keep separate sums so that two chains of additions run side by side.
  let sum = 0;
  let squares = 0;
  let ex = 0;
  let ey = 0;
  let sumOdd = 0;
  let squaresOdd = 0;
  let exOdd = 0;
  let eyOdd = 0;
  for (let r = 0; r < size; r++) {
    at += stride;
    let k = 3 * ((y0 + r) * width + x0);
    left = next[at];
    let c = 0;
    for (; c + 1 < size; c += 2, k += 6) {
      const middle = next[at + c + 1];
      const right = next[at + c + 2];
      const below = left + fx * (middle - left);
      const belowOdd = middle + fx * (right - middle);
      left = right;
      const above = line[c];
      const aboveOdd = line[c + 1];
      line[c] = below;
      line[c + 1] = belowOdd;
      const d = above + fy * (below - above) - source[k];
      const dOdd = aboveOdd + fy * (belowOdd - aboveOdd) - source[k + 3];
      sum += d;
      squares += d * d;
      ex += d * source[k + 1];
      ey += d * source[k + 2];
      sumOdd += dOdd;
      squaresOdd += dOdd * dOdd;
      exOdd += dOdd * source[k + 4];
      eyOdd += dOdd * source[k + 5];
    }
    if (c < size) {
      const below = left + fx * (next[at + c + 1] - left);
      const above = line[c];
      line[c] = below;
      const d = above + fy * (below - above) - source[k];
      sum += d;
      squares += d * d;
      ex += d * source[k + 1];
      ey += d * source[k + 2];
    }
  }
  sum += sumOdd;
  squares += squaresOdd;
  ex += exOdd;
  ey += eyOdd;
  if (!search.meanNormalised) {
    step[0] = ex;
    step[1] = ey;
    search.distance = squares;
    return;
  }
  const t = PATCH_TERMS * s;
  step[0] = ex - sum * search.terms[t + 3];
  step[1] = ey - sum * search.terms[t + 4];
  search.distance = squares - (sum * sum) / (size * size);
}

/**
 * Gauss–Newton descent of patch s from its vector in `out`, whose distance is in search.distance (its slope
 * already in search.step when `haveSlope`); the start comes that way rather than as arguments for the reason given
 * at matchPatch. Writes the result into `out` unless it moved more than a patch side.
 */
function descend(search: Search, s: number, x0: number, y0: number, haveSlope: boolean, out: PatchVectors): void {
  const { frames, size, terms, landing, step } = search;
  const u = out.u[s];
  const v = out.v[s];
  const start = search.distance;
  const t = PATCH_TERMS * s;
  const h11 = terms[t];
  const h12 = terms[t + 1];
  const h22 = terms[t + 2];
  let cu = u;
  let cv = v;
  let last = start;
  let stepU = 0;
  let stepV = 0;
  let settled = false;
  let slopeKnown = haveSlope;
  for (let it = 0; it < search.perSweep; it++) {
    if (!slopeKnown) {
      land(frames, size, x0, y0, cu, cv, landing);
      matchPatch(search, s, x0, y0);
      const distance = search.distance;
      if (it > 0 && distance >= last) {
        // The last step made the match worse: take it back and stop.
        cu += stepU;
        cv += stepV;
        settled = true;
        break;
      }
      last = distance;
    }
    slopeKnown = false;
    stepU = h11 * step[0] + h12 * step[1];
    stepV = h12 * step[0] + h22 * step[1];
    cu -= stepU;
    cv -= stepV;
    if (stepU * stepU + stepV * stepV < MIN_STEP * MIN_STEP) {
      settled = true;
      break;
    }
  }
  const du = cu - u;
  const dv = cv - v;
  if (du * du + dv * dv <= size * size) {
    out.u[s] = cu;
    out.v[s] = cv;
    // After a short last step the distance has barely changed; after a full run it is unknown.
    out.distance[s] = settled ? last : Number.NaN;
    out.settled[s] = settled ? 1 : 0;
  } else {
    out.u[s] = u;
    out.v[s] = v;
    out.distance[s] = start;
    out.settled[s] = 0;
  }
}

/**
 * Fills the sparse field for one level, starting from the dense field (u, v) of the level (the coarser level's
 * result, upsampled) read at each patch centre. `terms` comes from patchTerms with the same grid. In the second
 * sweep a patch that settled in the first keeps its vector unless a neighbour's fits better, and its distance
 * is not computed again.
 */
export function inverseSearch(
  frames: SearchFrames,
  grid: PatchGrid,
  terms: Float32Array,
  u: Float32Array,
  v: Float32Array,
  descentIterations: number,
  meanNormalised: boolean,
  scratch: SearchScratch,
  out: PatchVectors,
): void {
  const { size, stride, cols, rows } = grid;
  const half = size >> 1;
  const search: Search = {
    frames,
    size,
    meanNormalised,
    terms,
    perSweep: Math.floor(descentIterations / 2),
    landing: { at: 0, fx: 0, fy: 0 },
    line: scratch.line,
    step: scratch.step,
    distance: Number.NaN,
  };
  const { landing, step } = search;
  const { u: su, v: sv, distance: sd, settled } = out;
  for (let sweep = 0; sweep < 2; sweep++) {
    const forward = sweep === 0;
    const dir = forward ? 1 : -1;
    for (let ii = 0; ii < rows; ii++) {
      const i = forward ? ii : rows - 1 - ii;
      const y0 = i * stride;
      for (let jj = 0; jj < cols; jj++) {
        const j = forward ? jj : cols - 1 - jj;
        const x0 = j * stride;
        const s = i * cols + j;
        if (forward) {
          const centre = (y0 + half) * frames.width + x0 + half;
          su[s] = u[centre];
          sv[s] = v[centre];
        }
        let startU = su[s];
        let startV = sv[s];
        let best = forward ? Number.NaN : sd[s];
        // The slope at the best start so far, which the first descent step then uses.
        let haveSlope = false;
        let slopeX = 0;
        let slopeY = 0;
        if (Number.isNaN(best)) {
          land(frames, size, x0, y0, startU, startV, landing);
          matchPatch(search, s, x0, y0);
          best = search.distance;
          slopeX = step[0];
          slopeY = step[1];
          haveSlope = true;
        }
        // Spatial propagation: the neighbours visited just before, along the row and in the previous row.
        // A candidate within MIN_CANDIDATE_DISTANCE of the start would descend to the same point: skipped.
        // Its slope comes with its distance, so a candidate that wins needs no second evaluation to descend.
        let moved = false;
        for (let k = 0; k < 2; k++) {
          if (k === 0 ? jj === 0 : ii === 0) continue;
          const q = k === 0 ? s - dir : s - dir * cols;
          const cu = su[q];
          const cv = sv[q];
          const du = cu - startU;
          const dv = cv - startV;
          if (du * du + dv * dv < MIN_CANDIDATE_DISTANCE * MIN_CANDIDATE_DISTANCE) continue;
          land(frames, size, x0, y0, cu, cv, landing);
          matchPatch(search, s, x0, y0);
          if (search.distance < best) {
            best = search.distance;
            startU = cu;
            startV = cv;
            slopeX = step[0];
            slopeY = step[1];
            haveSlope = true;
            moved = true;
          }
        }
        if (!forward && !moved && settled[s] === 1) continue;
        su[s] = startU;
        sv[s] = startV;
        search.distance = best;
        step[0] = slopeX;
        step[1] = slopeY;
        descend(search, s, x0, y0, haveSlope, out);
      }
    }
  }
}
