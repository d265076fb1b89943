// Pixel-by-pixel comparison of two motion fields (interleaved u, v): mean and largest endpoint distance.

import { endpointError } from '../../../worker/motion/fields/error-measures.js';

export function fieldDifference(a: Float32Array, b: Float32Array): { mean: number; max: number } {
  if (a.length !== b.length) throw new Error(`fields differ in length: ${a.length} and ${b.length}`);
  let sum = 0;
  let max = 0;
  for (let i = 0; i < a.length; i += 2) {
    const distance = endpointError(a[i], a[i + 1], b[i], b[i + 1]);
    sum += distance;
    if (distance > max) max = distance;
  }
  return { mean: sum / (a.length / 2), max };
}

/** True when both arrays hold exactly the same bits (NaN payloads and −0 included). */
export function sameBits(a: Float32Array, b: Float32Array): boolean {
  if (a.length !== b.length) return false;
  const x = new Uint32Array(a.buffer, a.byteOffset, a.length);
  const y = new Uint32Array(b.buffer, b.byteOffset, b.length);
  for (let i = 0; i < x.length; i++) if (x[i] !== y[i]) return false;
  return true;
}
