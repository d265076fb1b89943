/**
 * The compact descriptor a trained critic (contrastive-critic.ts) reads from a view plane (view-plane.ts):
 * 1. layout: the plane shrunk to 8 × 8 by area averaging (area-resize.ts);
 * 2. texture energy: the plane shrunk to 64 × 64, its gradient magnitude by central differences, shrunk to 8 × 8.
 * Each half has its mean removed and is scaled to unit variance (a flat half becomes zeros), so brightness,
 * contrast and the units of each view kind drop out; the descriptor has 128 values.
 * Why both halves: for frame~neighbour the layouts of the two views agree almost cell by cell, which a linear map
 * finds at once. For frame~motion the flow magnitude is not a linear function of grey levels: an estimator measures
 * motion where there is texture to follow and the moving parts of a scene differ in texture from the still ones,
 * so the frame's texture-energy map is what lines up with the motion view's layout. A linear encoder over grey
 * levels alone could not compute that energy; with it in the descriptor, a linear encoder can.
 */

import { resizeArea } from './area-resize';

export const DESCRIPTOR_CELLS = 8;
export const DESCRIPTOR_GRADIENT_SIZE = 64;
export const DESCRIPTOR_LENGTH = 2 * DESCRIPTOR_CELLS * DESCRIPTOR_CELLS;

export function viewDescriptor(plane: Float32Array, width: number, height: number): Float32Array {
  if (plane.length !== width * height || width < 1 || height < 1) {
    throw new RangeError(`a ${width}×${height} plane needs ${width * height} values, got ${plane.length}`);
  }
  const cells = DESCRIPTOR_CELLS * DESCRIPTOR_CELLS;
  const out = new Float32Array(DESCRIPTOR_LENGTH);
  out.set(resizeArea(plane, width, height, DESCRIPTOR_CELLS, DESCRIPTOR_CELLS), 0);
  out.set(
    resizeArea(
      gradientMagnitude(
        resizeArea(plane, width, height, DESCRIPTOR_GRADIENT_SIZE, DESCRIPTOR_GRADIENT_SIZE),
        DESCRIPTOR_GRADIENT_SIZE,
      ),
      DESCRIPTOR_GRADIENT_SIZE,
      DESCRIPTOR_GRADIENT_SIZE,
      DESCRIPTOR_CELLS,
      DESCRIPTOR_CELLS,
    ),
    cells,
  );
  standardise(out.subarray(0, cells));
  standardise(out.subarray(cells));
  return out;
}

/** |∇I| of a size × size plane, central differences inside and one-sided differences at the border. */
function gradientMagnitude(plane: Float32Array, size: number): Float32Array {
  const out = new Float32Array(size * size);
  const at = (x: number, y: number) => plane[y * size + x]!;
  for (let y = 0; y < size; y += 1) {
    const up = Math.max(0, y - 1);
    const down = Math.min(size - 1, y + 1);
    for (let x = 0; x < size; x += 1) {
      const left = Math.max(0, x - 1);
      const right = Math.min(size - 1, x + 1);
      const gx = right > left ? (at(right, y) - at(left, y)) / (right - left) : 0;
      const gy = down > up ? (at(x, down) - at(x, up)) / (down - up) : 0;
      out[y * size + x] = Math.hypot(gx, gy);
    }
  }
  return out;
}

/** Zero mean, unit variance in place; a constant part (no information) becomes zeros. */
function standardise(values: Float32Array): void {
  let mean = 0;
  for (const v of values) mean += v;
  mean /= values.length;
  let variance = 0;
  for (const v of values) variance += (v - mean) ** 2;
  variance /= values.length;
  // Relative floor: float rounding of a flat plane leaves a variance of order 1e-14 × mean², not structure.
  const flat = variance <= 1e-12 * Math.max(1, mean * mean);
  const scale = flat ? 0 : 1 / Math.sqrt(variance);
  for (let i = 0; i < values.length; i += 1) values[i] = (values[i]! - mean) * scale;
}
