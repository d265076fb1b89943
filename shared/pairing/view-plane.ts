/**
 * One grey plane per view, so that views of different kinds can be embedded in one space and compared
 * (fixed-embedding.ts). Each kind keeps its spatial structure:
 * - frame, neighbour: BT.601 grey of the RGB frame (shared/colour/grey.ts);
 * - luma: L* itself;
 * - chroma: CIE chroma C*ab = √(a*² + b*²), how colourful each pixel is;
 * - motion: flow magnitude √(u² + v²); unknown flow (|u| or |v| > 1e9, or NaN, as the Middlebury flow format
 *   marks it) counts as 0.
 * Scales differ between kinds; that does not matter, because the embedding removes the mean and normalises.
 */

import { rgbToGrey } from '../colour/grey';
import type { ViewKind } from './pairing-graph';

export type ViewData =
  | { kind: Extract<ViewKind, 'frame' | 'neighbour'>; width: number; height: number; rgb: Uint8Array }
  | { kind: 'luma'; width: number; height: number; l: Float32Array }
  | { kind: 'chroma'; width: number; height: number; a: Float32Array; b: Float32Array }
  | { kind: 'motion'; width: number; height: number; u: Float32Array; v: Float32Array };

/** Middlebury flow-code `UNKNOWN_FLOW_THRESH`. */
const UNKNOWN_FLOW_THRESH = 1e9;

export function viewPlane(view: ViewData): Float32Array {
  const out = new Float32Array(view.width * view.height);
  switch (view.kind) {
    case 'frame':
    case 'neighbour':
      return rgbToGrey(view.rgb, out);
    case 'luma':
      if (view.l.length !== out.length) throw new RangeError(`L* plane does not match ${view.width}×${view.height}`);
      out.set(view.l);
      return out;
    case 'chroma':
      return magnitude(view.a, view.b, out, false);
    case 'motion':
      return magnitude(view.u, view.v, out, true);
  }
}

function magnitude(x: Float32Array, y: Float32Array, out: Float32Array, dropUnknown: boolean): Float32Array {
  if (x.length !== out.length || y.length !== out.length) {
    throw new RangeError(`planes of ${x.length} and ${y.length} values do not match ${out.length} pixels`);
  }
  for (let p = 0; p < out.length; p += 1) {
    const unknown = dropUnknown && !(Math.abs(x[p]) <= UNKNOWN_FLOW_THRESH && Math.abs(y[p]) <= UNKNOWN_FLOW_THRESH);
    out[p] = unknown ? 0 : Math.hypot(x[p], y[p]);
  }
  return out;
}
