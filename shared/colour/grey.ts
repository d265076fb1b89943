/**
 * Grey (video luma Y′) from 8-bit RGB, for estimation and per-frame signals.
 *
 * Source: ITU-R BT.601 luma weights Y′ = 0.299 R′ + 0.587 G′ + 0.114 B′, applied to the gamma-encoded values,
 * as OpenCV's "Color conversions" documentation gives for RGB → GRAY.
 *
 * Why BT.601 and not BT.709: the thresholds we borrow were set on this grey. The blur threshold on the variance
 * of the Laplacian comes from OpenCV practice (`cv2.cvtColor(…, COLOR_BGR2GRAY)`, BT.601 [V]), and PySceneDetect's
 * histogram cut detector reads Y after `COLOR_BGR2YUV`, whose Y uses the same weights [M]. Grey is not the luma
 * view: the luma view is CIE L* (see srgb-lab.ts), which is a perceptual lightness, not a video signal.
 */

export const REC601_WEIGHTS = Object.freeze({ r: 0.299, g: 0.587, b: 0.114 });

const CHANNELS = 3;

/** Interleaved 8-bit RGB → grey on the 0..255 scale, unrounded, written into `out` (one value a pixel). */
export function rgbToGrey(rgb: Uint8Array, out: Float32Array): Float32Array {
  if (rgb.length !== out.length * CHANNELS) {
    throw new RangeError(`RGB buffer of ${rgb.length} bytes does not match a grey buffer of ${out.length}`);
  }
  const { r, g, b } = REC601_WEIGHTS;
  for (let p = 0, i = 0; p < out.length; p += 1, i += CHANNELS) {
    out[p] = r * rgb[i] + g * rgb[i + 1] + b * rgb[i + 2];
  }
  return out;
}
