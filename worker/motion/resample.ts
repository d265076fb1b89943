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
  const maxX = width - 1;
  const maxY = height - 1;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const p = y * width + x;
      let sx = x + flow[2 * p];
      let sy = y + flow[2 * p + 1];
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

/** Per destination coordinate: the left/top source index and the weight of the next one. */
export function resizeAxis(srcSize: number, dstSize: number): ResizeAxis {
  const ratio = srcSize / dstSize;
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

/** Resizes an interleaved (u, v) field and multiplies u by `scaleU` and v by `scaleV` (pixel units change). */
export function resizeFlow(
  src: Float32Array,
  srcWidth: number,
  srcHeight: number,
  dst: Float32Array,
  dstWidth: number,
  dstHeight: number,
  scaleU: number,
  scaleV: number,
): void {
  resizeBilinear(src, srcWidth, srcHeight, dst, dstWidth, dstHeight, 2);
  for (let i = 0; i < dst.length; i += 2) {
    dst[i] *= scaleU;
    dst[i + 1] *= scaleV;
  }
}
