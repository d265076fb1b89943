// Densification, the second step of DIS on each pyramid level: every pixel's vector is the weighted mean of the
// vectors of all patches that cover it, each weighted by how well it explains that pixel, 1/max(1, |d|) with d
// the brightness difference between the second frame at the displaced pixel and the first frame.
// Source: T. Kroeger, R. Timofte, D. Dai, L. Van Gool, "Fast Optical Flow using Dense Inverse Search", ECCV 2016;
// the weight floor of 1 grey level and the edge rule (pixels past the last patch take it) are those of OpenCV's
// DISOpticalFlow (video/src/dis_flow.cpp).
// OpenCV gathers per pixel; here each patch scatters into its pixels, so a patch's bilinear weights are computed
// once and each row of the second frame is interpolated once (the same sums, except for patches displaced
// wholly out of the frame, which are clamped as a whole).

import { land, type Landing, type SearchFrames } from './inverse-search.js';
import type { PatchGrid } from './patch-grid.js';

/** Floats densify needs in its `sums` buffer. */
export function densifyBufferLength(width: number, height: number): number {
  return 3 * width * height;
}

/**
 * Writes the dense field (u, v) of a level from the sparse patch field (su, sv). The last column and row of
 * patches are stretched to the frame's edge. `frames.border` must be at least size + stride, and `line` hold
 * size + stride doubles. A level smaller than a patch has no patches; its field is left as it is.
 */
export function densify(
  frames: SearchFrames,
  grid: PatchGrid,
  su: Float32Array,
  sv: Float32Array,
  sums: Float32Array,
  line: Float64Array,
  u: Float32Array,
  v: Float32Array,
): void {
  const { size, stride, cols, rows } = grid;
  if (cols === 0) return;
  const { width, height, source, paddedNext: next } = frames;
  const paddedWidth = width + 2 * frames.border;
  const landing: Landing = { at: 0, fx: 0, fy: 0 };
  sums.fill(0);
  for (let i = 0; i < rows; i++) {
    const y0 = i * stride;
    const patchHeight = i === rows - 1 ? height - y0 : size;
    for (let j = 0; j < cols; j++) {
      const x0 = j * stride;
      const patchWidth = j === cols - 1 ? width - x0 : size;
      const s = i * cols + j;
      const pu = su[s];
      const pv = sv[s];
      land(frames, size, x0, y0, pu, pv, landing);
      const { fx, fy } = landing;
      let at = landing.at;
      let left = next[at];
      for (let c = 0; c < patchWidth; c++) {
        const right = next[at + c + 1];
        line[c] = left + fx * (right - left);
        left = right;
      }
      for (let r = 0; r < patchHeight; r++) {
        at += paddedWidth;
        const row = (y0 + r) * width + x0;
        left = next[at];
        for (let c = 0; c < patchWidth; c++) {
          const right = next[at + c + 1];
          const below = left + fx * (right - left);
          left = right;
          const above = line[c];
          line[c] = below;
          const d = Math.abs(above + fy * (below - above) - source[3 * (row + c)]);
          // 1/max(1, d) without a branch: whether d > 1 is a coin toss, and mispredicted branches cost more here
          // than the arithmetic. max(1, d) = (d + 1 + |d − 1|)/2.
          const weight = 2 / (d + 1 + Math.abs(d - 1));
          const o = 3 * (row + c);
          sums[o] += weight * pu;
          sums[o + 1] += weight * pv;
          sums[o + 2] += weight;
        }
      }
    }
  }
  const pixels = width * height;
  for (let p = 0; p < pixels; p++) {
    const o = 3 * p;
    const inverse = 1 / sums[o + 2];
    u[p] = sums[o] * inverse;
    v[p] = sums[o + 1] * inverse;
  }
}
