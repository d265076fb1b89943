// The regular grid of square patches that DIS searches on one pyramid level, and the per-patch constants of the
// inverse-compositional search: the inverse of the (optionally mean-centred) structure tensor and the mean
// gradient. Patch (i, j) has its top-left corner at (j·stride, i·stride); as in OpenCV's DISOpticalFlow there
// are 1 + ⌊(side − size)/stride⌋ patches per side, so up to stride − 1 pixels at the right and bottom edges are
// covered by no patch and take the last one's vector when the field is densified.
// The window sums are separable: sums along each image row at the grid's columns, then down the columns.

/** Per patch: (H⁻¹)₁₁, (H⁻¹)₁₂, (H⁻¹)₂₂, mean ∂I/∂x, mean ∂I/∂y. */
export const PATCH_TERMS = 5;
// Determinants below this (grey levels⁴ per pixel⁴) are raised to it, as OpenCV does with its EPS, so a patch
// without texture gets a finite step, which its own distance check or the patch-side limit then refuses.
const MIN_DETERMINANT = 1e-3;

export interface PatchGrid {
  size: number;
  stride: number;
  /** Patches per row and per column; 0 when the level is smaller than a patch. */
  cols: number;
  rows: number;
}

/** Patches along one side of the level. */
function patchesAlong(side: number, size: number, stride: number): number {
  return side < size ? 0 : 1 + Math.floor((side - size) / stride);
}

export function patchGrid(width: number, height: number, size: number, stride: number): PatchGrid {
  const cols = patchesAlong(width, size, stride);
  const rows = patchesAlong(height, size, stride);
  return { size, stride, cols: rows === 0 ? 0 : cols, rows: cols === 0 ? 0 : rows };
}

/**
 * Writes PATCH_TERMS values per patch into `terms` from the first frame's gradients (`source`: I, ∂I/∂x, ∂I/∂y
 * per pixel, as dis-levels.ts patchSource writes them). `rowSums` holds 5 · height · grid.cols floats. With
 * `centred`, the tensor is Σ(∇I − mean)(∇I − mean)ᵀ, the Gauss–Newton matrix of the mean-normalised patch
 * distance; otherwise Σ∇I∇Iᵀ.
 */
export function patchTerms(
  source: Float32Array,
  width: number,
  height: number,
  grid: PatchGrid,
  centred: boolean,
  rowSums: Float32Array,
  terms: Float32Array,
): void {
  const { size, stride, cols, rows } = grid;
  // Horizontal pass: for every image row and grid column, the five sums over the patch's columns.
  for (let y = 0; y < height; y++) {
    const row = y * width;
    for (let j = 0; j < cols; j++) {
      const start = 3 * (row + j * stride);
      let xx = 0;
      let xy = 0;
      let yy = 0;
      let sx = 0;
      let sy = 0;
      for (let k = 0; k < size; k++) {
        const a = source[start + 3 * k + 1];
        const b = source[start + 3 * k + 2];
        xx += a * a;
        xy += a * b;
        yy += b * b;
        sx += a;
        sy += b;
      }
      const o = 5 * (y * cols + j);
      rowSums[o] = xx;
      rowSums[o + 1] = xy;
      rowSums[o + 2] = yy;
      rowSums[o + 3] = sx;
      rowSums[o + 4] = sy;
    }
  }
  // Vertical pass: add the rows of each patch, then invert the 2×2 tensor.
  const n = size * size;
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < cols; j++) {
      let xx = 0;
      let xy = 0;
      let yy = 0;
      let sx = 0;
      let sy = 0;
      for (let k = 0; k < size; k++) {
        const o = 5 * ((i * stride + k) * cols + j);
        xx += rowSums[o];
        xy += rowSums[o + 1];
        yy += rowSums[o + 2];
        sx += rowSums[o + 3];
        sy += rowSums[o + 4];
      }
      const meanX = sx / n;
      const meanY = sy / n;
      if (centred) {
        xx -= sx * meanX;
        xy -= sx * meanY;
        yy -= sy * meanY;
      }
      let det = xx * yy - xy * xy;
      if (Math.abs(det) < MIN_DETERMINANT) det = MIN_DETERMINANT;
      const t = PATCH_TERMS * (i * cols + j);
      terms[t] = yy / det;
      terms[t + 1] = -xy / det;
      terms[t + 2] = xx / det;
      terms[t + 3] = meanX;
      terms[t + 4] = meanY;
    }
  }
}
