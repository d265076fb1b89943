// Variational refinement, the last step of DIS on each pyramid level: the densified field w is improved by an
// increment dw that minimises the data term (dis-variational-data.ts) plus α·Ψ(|∇(w + dw)|²), Ψ the Charbonnier
// penalty, by fixed-point iterations (the robust weights frozen) each followed by a few SOR sweeps.
// Sources: T. Brox, A. Bruhn, N. Papenberg, J. Weickert, "High Accuracy Optical Flow Estimation Based on a
// Theory for Warping", ECCV 2004 (the lagged-weight fixed point and SOR); T. Kroeger et al., "Fast Optical Flow
// using Dense Inverse Search", ECCV 2016; the discretisation, border rule (no smoothness across the
// frame edge) and ω = 1.6 of OpenCV's VariationalRefinement (video/src/variational_refinement.cpp). SOR sweeps
// per fixed-point iteration: 3, as in the authors' code (tikroeger/OF_DIS, run_dense.cpp: tv_solverit = 3,
// tv_sor = 1.6). OpenCV's DIS uses 5: on Grove3 that moves the error from 0.6322 to 0.6329 px, on the generated
// pairs of tests/unit/motion by at most 0.0045 px either way, for about 10% more time per pair (measured).
// The working arrays carry a one-pixel ring (stride width + 2) whose edge weights are 0, so the sweeps need no
// border tests.

import { DATA_TERMS, EPSILON, ZETA, dataTerms } from './variational-data.js';
import type { MotionWorkspace } from '../kernels/workspace.js';

export interface RefinementWeights {
  /** Smoothness weight α. */
  alpha: number;
  /** Brightness-constancy weight δ. */
  delta: number;
  /** Gradient-constancy weight γ. */
  gamma: number;
  /** Fixed-point iterations; 0 skips the refinement. */
  iterations: number;
}

const SOR_SWEEPS = 3;
const OMEGA = 1.6;

// Per pixel of the ringed layout, in one interleaved array so the sweeps keep a single base pointer: the starting
// field, the increment, the edge weights to the right and lower neighbours, and the 2×2 system with its
// diagonal stored as the SOR gains ω/A11 and ω/A22.
const U0 = 0;
const V0 = 1;
const DU = 2;
const DV = 3;
const WX = 4;
const WY = 5;
const GAIN_U = 6;
const A12 = 7;
const GAIN_V = 8;
const B1 = 9;
const B2 = 10;
const RECORD = 11;

/**
 * One fixed-point step's linear system, row by row in raster order, followed on each row by the first SOR sweep.
 * Two walks along a row: dataAndWeights (the robust weights and the data term's part of the system) and
 * couplingsAndSweep (the smoothness couplings and the SOR update). A walk with a short body lets the processor
 * overlap the long chains of square roots and divisions of neighbouring pixels (measured: the refinement takes
 * about 7% less time than with one walk doing both). The SOR update at a pixel reads only its own system, the
 * edges of its left and upper neighbours (built) and increments that the build no longer needs, so the result is
 * that of building everything first.
 */
function buildSystemAndSweep(
  terms: Float32Array,
  records: Float32Array,
  w: number,
  h: number,
  weights: RefinementWeights,
): void {
  for (let y = 0; y < h; y++) {
    dataAndWeights(terms, records, w, h, y, weights);
    couplingsAndSweep(records, w, y);
  }
}

/**
 * Row y of the system, the parts that need no neighbour's update: the robust smoothness weight from forward
 * differences of w + dw (the edges to the right and below; none across the frame edge) and the data term with
 * its current robust weights. Leaves the diagonal in GAIN_U, GAIN_V (without the couplings yet) and the data
 * term's right-hand side in B1, B2.
 */
function dataAndWeights(
  terms: Float32Array,
  records: Float32Array,
  w: number,
  h: number,
  y: number,
  weights: RefinementWeights,
): void {
  const down = (w + 2) * RECORD;
  const halfAlpha = weights.alpha / 2;
  const halfDelta = weights.delta / 2;
  const halfGamma = weights.gamma / 2;
  const eps2 = EPSILON * EPSILON;
  const zeta2 = ZETA * ZETA;
  const inner = y < h - 1;
  let r = ((y + 1) * (w + 2) + 1) * RECORD;
  let t = DATA_TERMS * y * w;
  // This pixel's values carry over from the previous one's right neighbour.
  let d = records[r + DU];
  let e = records[r + DV];
  let cu = records[r + U0] + d;
  let cv = records[r + V0] + e;
  for (let x = 0; x < w; x++, r += RECORD, t += DATA_TERMS) {
    const rightDu = records[r + RECORD + DU];
    const rightDv = records[r + RECORD + DV];
    const rightU = records[r + RECORD + U0] + rightDu;
    const rightV = records[r + RECORD + V0] + rightDv;
    let gradient = eps2;
    if (x < w - 1) {
      const ux = rightU - cu;
      const vx = rightV - cv;
      gradient += ux * ux + vx * vx;
    }
    if (inner) {
      const uy = records[r + down + U0] + records[r + down + DU] - cu;
      const vy = records[r + down + V0] + records[r + down + DV] - cv;
      gradient += uy * uy + vy * vy;
    }
    const ix = terms[t];
    const iy = terms[t + 1];
    const iz = terms[t + 2];
    const qxx = terms[t + 3];
    const qxy = terms[t + 4];
    const qxz = terms[t + 5];
    const rxy = terms[t + 6];
    const ryy = terms[t + 7];
    const ryz = terms[t + 8];
    const brightness = iz + ix * d + iy * e;
    const kx = qxz + qxx * d + qxy * e;
    const ky = ryz + rxy * d + ryy * e;
    // The three Charbonnier weights c/√X share one division: 1/√Xᵢ = (Πⱼ≠ᵢ √Xⱼ) / Π √X.
    const rootSmooth = Math.sqrt(gradient);
    const rootColour = Math.sqrt(brightness * brightness + eps2);
    const rootConstancy = Math.sqrt(kx * kx + ky * ky + eps2);
    const inverseProduct = 1 / (rootSmooth * rootColour * rootConstancy);
    const smooth = halfAlpha * rootColour * rootConstancy * inverseProduct;
    const colour = halfDelta * rootSmooth * rootConstancy * inverseProduct;
    const constancy = halfGamma * rootSmooth * rootColour * inverseProduct;
    records[r + WX] = x < w - 1 ? smooth : 0;
    records[r + WY] = inner ? smooth : 0;
    // Gradient constancy adds the products of its x- and y-equations.
    records[r + GAIN_U] = colour * ix * ix + zeta2 + constancy * (qxx * qxx + rxy * rxy);
    records[r + GAIN_V] = colour * iy * iy + zeta2 + constancy * (qxy * qxy + ryy * ryy);
    records[r + A12] = colour * ix * iy + constancy * (qxx * qxy + rxy * ryy);
    records[r + B1] = -colour * iz * ix - constancy * (qxx * qxz + rxy * ryz);
    records[r + B2] = -colour * iz * iy - constancy * (qxy * qxz + ryy * ryz);
    d = rightDu;
    e = rightDv;
    cu = rightU;
    cv = rightV;
  }
}

/**
 * Completes row y of the system with the smoothness couplings to the four neighbours (the diagonal stored as the
 * SOR gains ω/A11, ω/A22) and makes the first SOR update of each pixel (see sorSweep) with the values at hand.
 */
function couplingsAndSweep(records: Float32Array, w: number, y: number): void {
  const down = (w + 2) * RECORD;
  let r = ((y + 1) * (w + 2) + 1) * RECORD;
  // Values of the left neighbour (the ring's are 0) and of this pixel carry over from the previous one.
  let left = 0;
  let leftU0 = 0;
  let leftV0 = 0;
  let leftDu = 0;
  let leftDv = 0;
  let u0 = records[r + U0];
  let v0 = records[r + V0];
  let d = records[r + DU];
  let e = records[r + DV];
  for (let x = 0; x < w; x++, r += RECORD) {
    const rightU0 = records[r + RECORD + U0];
    const rightV0 = records[r + RECORD + V0];
    const rightDu = records[r + RECORD + DU];
    const rightDv = records[r + RECORD + DV];
    const belowU0 = records[r + down + U0];
    const belowV0 = records[r + down + V0];
    const right = records[r + WX];
    const below = records[r + WY];
    const above = records[r - down + WY];
    const aboveU0 = records[r - down + U0];
    const aboveV0 = records[r - down + V0];
    const neighbours = left + right + above + below;
    const a11 = records[r + GAIN_U] + neighbours;
    const a22 = records[r + GAIN_V] + neighbours;
    const gains = OMEGA / (a11 * a22);
    const gainU = a22 * gains;
    const gainV = a11 * gains;
    const coupling = records[r + A12];
    const b1 =
      records[r + B1] + left * (leftU0 - u0) + right * (rightU0 - u0) + above * (aboveU0 - u0) + below * (belowU0 - u0);
    const b2 =
      records[r + B2] + left * (leftV0 - v0) + right * (rightV0 - v0) + above * (aboveV0 - v0) + below * (belowV0 - v0);
    records[r + GAIN_U] = gainU;
    records[r + GAIN_V] = gainV;
    records[r + B1] = b1;
    records[r + B2] = b2;
    const belowDu = records[r + down + DU];
    const belowDv = records[r + down + DV];
    const sigmaU = left * leftDu + right * rightDu + above * records[r - down + DU] + below * belowDu;
    const sigmaV = left * leftDv + right * rightDv + above * records[r - down + DV] + below * belowDv;
    const nextU = (1 - OMEGA) * d + gainU * (b1 - coupling * e + sigmaU);
    const nextV = (1 - OMEGA) * e + gainV * (b2 + sigmaV - coupling * nextU);
    records[r + DU] = nextU;
    records[r + DV] = nextV;
    left = right;
    leftU0 = u0;
    leftV0 = v0;
    leftDu = nextU;
    leftDv = nextV;
    u0 = rightU0;
    v0 = rightV0;
    d = rightDu;
    e = rightDv;
  }
}

/**
 * One SOR sweep in raster order (Gauss–Seidel with over-relaxation): du ← (1 − ω)·du + (ω/A11)·(b1 − A12·dv +
 * Σ w·du_neighbour), then dv likewise with the new du. OpenCV sweeps red–black, which serves its SIMD and
 * threads; this order converges alike and reads memory in sequence. Only the left neighbour was updated just
 * before, so every other term is summed first, off the chain of dependent operations that bounds the speed.
 */
function sorSweep(records: Float32Array, w: number, h: number): void {
  const pw = w + 2;
  const down = pw * RECORD;
  const keep = 1 - OMEGA;
  for (let y = 0; y < h; y++) {
    let r = ((y + 1) * pw + 1) * RECORD;
    let left = 0; // the ring's weight
    let leftU = 0;
    let leftV = 0;
    let du = records[r + DU];
    let dv = records[r + DV];
    for (let x = 0; x < w; x++, r += RECORD) {
      const right = records[r + WX];
      const above = records[r - down + WY];
      const below = records[r + WY];
      const rightU = records[r + RECORD + DU];
      const rightV = records[r + RECORD + DV];
      const gainU = records[r + GAIN_U];
      const gainV = records[r + GAIN_V];
      const coupling = records[r + A12];
      const aboveU = records[r - down + DU];
      const aboveV = records[r - down + DV];
      const belowU = records[r + down + DU];
      const belowV = records[r + down + DV];
      const neighboursU = right * rightU + above * aboveU + below * belowU;
      const baseU = keep * du + gainU * (records[r + B1] - coupling * dv + neighboursU);
      const baseV = keep * dv + gainV * (records[r + B2] + right * rightV + above * aboveV + below * belowV);
      const nextU = baseU + gainU * left * leftU;
      const nextV = baseV + gainV * left * leftV - gainV * coupling * nextU;
      records[r + DU] = nextU;
      records[r + DV] = nextV;
      left = right;
      leftU = nextU;
      leftV = nextV;
      du = rightU;
      dv = rightV;
    }
  }
}

/** Refines the planar field (u, v) of one level in place. Uses workspace buffers "dis.var.*" and "dis.data.*". */
export function refineField(
  prev: Float32Array,
  next: Float32Array,
  w: number,
  h: number,
  u: Float32Array,
  v: Float32Array,
  weights: RefinementWeights,
  workspace: MotionWorkspace,
): void {
  if (weights.iterations === 0) return;
  const terms = workspace.float32('dis.var.terms', DATA_TERMS * w * h);
  dataTerms(prev, next, w, h, u, v, workspace, terms);
  const pw = w + 2;
  // The ring stays 0: no weights across the frame edge, so its increments and fields are never used.
  const records = workspace.float32('dis.var.records', pw * (h + 2) * RECORD);
  records.fill(0);
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const r = ((y + 1) * pw + x + 1) * RECORD;
      records[r + U0] = u[y * w + x];
      records[r + V0] = v[y * w + x];
    }
  }
  for (let i = 0; i < weights.iterations; i++) {
    buildSystemAndSweep(terms, records, w, h, weights);
    for (let s = 1; s < SOR_SWEEPS; s++) sorSweep(records, w, h);
  }
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const r = ((y + 1) * pw + x + 1) * RECORD;
      u[y * w + x] = records[r + U0] + records[r + DU];
      v[y * w + x] = records[r + V0] + records[r + DV];
    }
  }
}
