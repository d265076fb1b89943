/**
 * Resizing a single-channel image by area averaging: each output pixel is the mean of the source area it
 * covers, with partly covered source pixels weighted by the covered fraction. This is what OpenCV's
 * INTER_AREA does when shrinking (its exact-area path for non-integer ratios); when enlarging it becomes box
 * sampling, which is all the small thumbnails here ever need. Separable: rows first, then columns.
 */

interface AxisTaps {
  /** For output position o, its source indices and weights are start[o]..start[o+1]−1 of index/weight. */
  start: Int32Array;
  index: Int32Array;
  weight: Float64Array;
}

/** Area-averaged copy of `src` (width × height, row by row) at outWidth × outHeight. */
export function resizeArea(
  src: Float32Array,
  width: number,
  height: number,
  outWidth: number,
  outHeight: number,
  out: Float32Array = new Float32Array(outWidth * outHeight),
): Float32Array {
  for (const size of [width, height, outWidth, outHeight]) {
    if (!Number.isInteger(size) || size < 1) throw new RangeError(`image sizes must be positive integers`);
  }
  if (src.length !== width * height || out.length !== outWidth * outHeight) {
    throw new RangeError(`buffers do not match ${width}×${height} → ${outWidth}×${outHeight}`);
  }
  const columns = axisTaps(width, outWidth);
  const rows = axisTaps(height, outHeight);
  const narrowed = new Float64Array(height * outWidth);
  for (let y = 0; y < height; y += 1) {
    for (let ox = 0; ox < outWidth; ox += 1) {
      let acc = 0;
      for (let t = columns.start[ox]; t < columns.start[ox + 1]; t += 1) {
        acc += columns.weight[t] * src[y * width + columns.index[t]];
      }
      narrowed[y * outWidth + ox] = acc;
    }
  }
  for (let oy = 0; oy < outHeight; oy += 1) {
    for (let ox = 0; ox < outWidth; ox += 1) {
      let acc = 0;
      for (let t = rows.start[oy]; t < rows.start[oy + 1]; t += 1) {
        acc += rows.weight[t] * narrowed[rows.index[t] * outWidth + ox];
      }
      out[oy * outWidth + ox] = acc;
    }
  }
  return out;
}

/** Source taps along one axis: output o covers [o·s, (o+1)·s) with s = size / outSize. */
function axisTaps(size: number, outSize: number): AxisTaps {
  const scale = size / outSize;
  const start = new Int32Array(outSize + 1);
  const index: number[] = [];
  const weight: number[] = [];
  for (let o = 0; o < outSize; o += 1) {
    start[o] = index.length;
    const from = o * scale;
    const to = Math.min(size, (o + 1) * scale);
    for (let i = Math.floor(from); i < to; i += 1) {
      const covered = Math.min(to, i + 1) - Math.max(from, i);
      if (covered > 0) {
        index.push(i);
        weight.push(covered / scale);
      }
    }
  }
  start[outSize] = index.length;
  return { start, index: Int32Array.from(index), weight: Float64Array.from(weight) };
}
