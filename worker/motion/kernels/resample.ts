// Bilinear resampling of Float32Array images and motion fields: point sampling, backward warping and resizing.
// Resize geometry follows OpenCV's resize with INTER_LINEAR (imgproc/resize.cpp): pixel centres are aligned,
// src = (dst + 0.5)·(srcSize/dstSize) − 0.5, and positions past the first or last pixel take that pixel.
// Sampling outside the image repeats the edge pixel (BORDER_REPLICATE).

function clamp(value: number, low: number, high: number): number {
  return value < low ? low : value > high ? high : value;
}

/** Bilinear value of a single-channel image at (x, y), with the edge pixels repeated outside the image. */
export function sampleBilinear(image: Float32Array, width: number, height: number, x: number, y: number): number {
  const cx = clamp(x, 0, width - 1);
  const cy = clamp(y, 0, height - 1);
  const x0 = Math.floor(cx);
  const y0 = Math.floor(cy);
  const x1 = x0 + 1 < width ? x0 + 1 : x0;
  const y1 = y0 + 1 < height ? y0 + 1 : y0;
  const fx = cx - x0;
  const fy = cy - y0;
  const top = image[y0 * width + x0] * (1 - fx) + image[y0 * width + x1] * fx;
  const bottom = image[y1 * width + x0] * (1 - fx) + image[y1 * width + x1] * fx;
  return top * (1 - fy) + bottom * fy;
}

/**
 * Backward warp: out(x) = image(x + flow(x)), bilinear, edges repeated. With `flow` from frame A to frame B and
 * `image` = B, the result approximates A. `out` must not be `image`.
 */
export function warpBackward(
  image: Float32Array,
  width: number,
  height: number,
  flow: Float32Array,
  out: Float32Array,
): void {
  warpBy(image, width, height, flow, flow, 2, 1, out);
}

/** warpBackward for a field stored as two planes, u and v. */
export function warpPlanar(
  image: Float32Array,
  width: number,
  height: number,
  u: Float32Array,
  v: Float32Array,
  out: Float32Array,
): void {
  warpBy(image, width, height, u, v, 1, 0, out);
}

/** The warp of both layouts: pixel p moves by (u[stride·p], v[stride·p + vOffset]). */
function warpBy(
  image: Float32Array,
  width: number,
  height: number,
  u: Float32Array,
  v: Float32Array,
  stride: number,
  vOffset: number,
  out: Float32Array,
): void {
  const maxX = width - 1;
  const maxY = height - 1;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const p = y * width + x;
      let sx = x + u[stride * p];
      let sy = y + v[stride * p + vOffset];
      sx = sx < 0 ? 0 : sx > maxX ? maxX : sx;
      sy = sy < 0 ? 0 : sy > maxY ? maxY : sy;
      const x0 = Math.floor(sx);
      const y0 = Math.floor(sy);
      const fx = sx - x0;
      const fy = sy - y0;
      const i00 = y0 * width + x0;
      const dx = x0 < maxX ? 1 : 0;
      const dy = y0 < maxY ? width : 0;
      const top = image[i00] + fx * (image[i00 + dx] - image[i00]);
      const bottom = image[i00 + dy] + fx * (image[i00 + dy + dx] - image[i00 + dy]);
      out[p] = top + fy * (bottom - top);
    }
  }
}

/** Source index and weight of the second neighbour for each destination coordinate (OpenCV's geometry). */
export interface ResizeAxis {
  index: Int32Array;
  weight: Float32Array;
}

/**
 * Per destination coordinate: the left/top source index and the weight of the next one, for source position
 * (d + ½)·ratio − ½ clamped to the source; `ratio` is srcSize/dstSize unless given.
 */
export function resizeAxis(srcSize: number, dstSize: number, ratio = srcSize / dstSize): ResizeAxis {
  const index = new Int32Array(dstSize);
  const weight = new Float32Array(dstSize);
  for (let d = 0; d < dstSize; d++) {
    const position = (d + 0.5) * ratio - 0.5;
    let s = Math.floor(position);
    let f = position - s;
    if (s < 0) {
      s = 0;
      f = 0;
    }
    if (s >= srcSize - 1) {
      s = srcSize - 1;
      f = 0;
    }
    index[d] = s;
    weight[d] = f;
  }
  return { index, weight };
}

/** Resizes an interleaved image with `channels` values per pixel; dst must not be src. */
export function resizeBilinear(
  src: Float32Array,
  srcWidth: number,
  srcHeight: number,
  dst: Float32Array,
  dstWidth: number,
  dstHeight: number,
  channels = 1,
): void {
  const xs = resizeAxis(srcWidth, dstWidth);
  const ys = resizeAxis(srcHeight, dstHeight);
  const rowStride = srcWidth * channels;
  for (let dy = 0; dy < dstHeight; dy++) {
    const fy = ys.weight[dy];
    const row0 = ys.index[dy] * rowStride;
    const row1 = ys.index[dy] + 1 < srcHeight ? row0 + rowStride : row0;
    const outRow = dy * dstWidth * channels;
    for (let dx = 0; dx < dstWidth; dx++) {
      const fx = xs.weight[dx];
      const col0 = xs.index[dx] * channels;
      const col1 = xs.index[dx] + 1 < srcWidth ? col0 + channels : col0;
      for (let c = 0; c < channels; c++) {
        const top = src[row0 + col0 + c] * (1 - fx) + src[row0 + col1 + c] * fx;
        const bottom = src[row1 + col0 + c] * (1 - fx) + src[row1 + col1 + c] * fx;
        dst[outRow + dx * channels + c] = top * (1 - fy) + bottom * fy;
      }
    }
  }
}

/**
 * A field's two components: u of pixel i at u[i·step] and v at v[i·step]. Planar planes have step 1; an
 * interleaved (u, v) array is { u: flow, v: flow.subarray(1), step: 2 }.
 */
export interface FieldPlanes {
  u: Float32Array;
  v: Float32Array;
  step: number;
}

/** Floats resampleField needs in its `lines` buffer. */
export function resampleBufferLength(dstWidth: number): number {
  return 4 * dstWidth;
}

/**
 * Bilinear resampling of a field to dw × dh at the source positions the axes give (see resizeAxis), u multiplied
 * by `scaleU` and v by `scaleV` (pixel units change with the size). Separable, as OpenCV's resize: each source
 * row is interpolated along x once, into one of two single-precision lines (`lines` holds resampleBufferLength
 * floats), and each destination row blends the two lines around it, so upsampling reads every source row once.
 */
export function resampleField(
  src: FieldPlanes,
  sw: number,
  sh: number,
  dst: FieldPlanes,
  dw: number,
  dh: number,
  xs: ResizeAxis,
  ys: ResizeAxis,
  scaleU: number,
  scaleV: number,
  lines: Float32Array,
): void {
  let upper = lines.subarray(0, 2 * dw);
  let lower = lines.subarray(2 * dw, 4 * dw);
  let upperRow = -1;
  let lowerRow = -1;
  const { u, v, step } = dst;
  for (let dy = 0; dy < dh; dy++) {
    const y0 = ys.index[dy];
    const y1 = y0 + 1 < sh ? y0 + 1 : y0;
    // Source rows only move down: a row already widened as the lower line becomes the upper one.
    if (y0 !== upperRow) {
      if (y0 === lowerRow) {
        const line = upper;
        upper = lower;
        lower = line;
        lowerRow = -1;
      } else {
        widenRow(src, sw, y0, xs, dw, upper);
      }
      upperRow = y0;
    }
    if (y1 !== y0 && y1 !== lowerRow) {
      widenRow(src, sw, y1, xs, dw, lower);
      lowerRow = y1;
    }
    const below = y1 === y0 ? upper : lower;
    const fy = ys.weight[dy];
    const gy = 1 - fy;
    for (let i = 0, o = dy * dw * step, end = 2 * dw; i < end; i += 2, o += step) {
      u[o] = (upper[i] * gy + below[i] * fy) * scaleU;
      v[o] = (upper[i + 1] * gy + below[i + 1] * fy) * scaleV;
    }
  }
}

/** Source row y of a field interpolated along x at the axis positions, u and v interleaved into `line`. */
function widenRow(src: FieldPlanes, sw: number, y: number, xs: ResizeAxis, dw: number, line: Float32Array): void {
  const { u, v, step } = src;
  const row = y * sw;
  const { index, weight } = xs;
  for (let x = 0, o = 0; x < dw; x++, o += 2) {
    const left = index[x];
    const a = (row + left) * step;
    const b = left + 1 < sw ? a + step : a;
    const f = weight[x];
    const g = 1 - f;
    line[o] = u[a] * g + u[b] * f;
    line[o + 1] = v[a] * g + v[b] * f;
  }
}

/**
 * Resizes an interleaved (u, v) field as OpenCV's resize does and multiplies u by `scaleU` and v by `scaleV`.
 * `lines` holds resampleBufferLength(dstWidth) floats.
 */
export function resizeFlow(
  src: Float32Array,
  srcWidth: number,
  srcHeight: number,
  dst: Float32Array,
  dstWidth: number,
  dstHeight: number,
  scaleU: number,
  scaleV: number,
  lines: Float32Array,
): void {
  resampleField(
    { u: src, v: src.subarray(1), step: 2 },
    srcWidth,
    srcHeight,
    { u: dst, v: dst.subarray(1), step: 2 },
    dstWidth,
    dstHeight,
    resizeAxis(srcWidth, dstWidth),
    resizeAxis(srcHeight, dstHeight),
    scaleU,
    scaleV,
    lines,
  );
}
