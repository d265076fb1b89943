import { resizeArea } from '../../shared/pairing/area-resize';
import { isUnknownFlow, UNKNOWN_FLOW } from '../../shared/motion/unknown-flow';

/** An output pixel needs at least this share of known source area to stay known. */
export const MIN_KNOWN_SHARE = 0.5;

/**
 * A motion field at another size, for pairsets with an output size. Each output vector is the area-weighted mean
 * of the known source vectors it covers (shared/pairing/area-resize.ts, OpenCV's INTER_AREA when shrinking), then
 * multiplied by the scale of its axis (u by outWidth / width, v by outHeight / height), because a displacement
 * measured in source pixels spans proportionally fewer output pixels. An output pixel covered less than half by
 * known vectors becomes unknown (UNKNOWN_FLOW), so unknown motion never blends into a made-up vector.
 */
export function areaResizeFlow(
  flow: Float32Array,
  width: number,
  height: number,
  outWidth: number,
  outHeight: number,
): Float32Array {
  const pixels = width * height;
  if (flow.length !== 2 * pixels) throw new RangeError(`a ${width}×${height} field needs ${2 * pixels} values`);
  const u = new Float32Array(pixels);
  const v = new Float32Array(pixels);
  const known = new Float32Array(pixels);
  for (let p = 0; p < pixels; p += 1) {
    if (isUnknownFlow(flow[2 * p], flow[2 * p + 1])) continue;
    u[p] = flow[2 * p];
    v[p] = flow[2 * p + 1];
    known[p] = 1;
  }
  const sumU = resizeArea(u, width, height, outWidth, outHeight);
  const sumV = resizeArea(v, width, height, outWidth, outHeight);
  const share = resizeArea(known, width, height, outWidth, outHeight);
  const scaleX = outWidth / width;
  const scaleY = outHeight / height;
  const out = new Float32Array(2 * outWidth * outHeight);
  for (let p = 0; p < outWidth * outHeight; p += 1) {
    const weight = share[p];
    const keep = weight >= MIN_KNOWN_SHARE;
    out[2 * p] = keep ? (sumU[p] / weight) * scaleX : UNKNOWN_FLOW;
    out[2 * p + 1] = keep ? (sumV[p] / weight) * scaleY : UNKNOWN_FLOW;
  }
  return out;
}
