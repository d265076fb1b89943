/**
 * Storage encodings of the luma and chroma views (our own layout, Kinefold DESIGN §7):
 * - luma: 8-bit grey, round(L* × 2.55) clamped to 0..255, so L* = 100 → 255;
 * - chroma: 16-bit RGB, a* in red and b* in green, each round((c + 128) × 256) clamped to 0..65535, blue 0,
 *   so c = 0 → 32768 and one code step is 1/256 of a unit of a* or b*.
 * Rounding is half up (Math.round). These functions only fill buffers; writing PNG files happens in the worker.
 */

/** 2.55 codes per unit of L*; encoding multiplies by 255 before dividing by 100 so exact halves stay exact. */
export const LUMA_SCALE = 255 / 100;
export const CHROMA_OFFSET = 128;
export const CHROMA_SCALE = 256;

const MAX_8BIT = 255;
const L_STAR_MAX = 100;
const MAX_16BIT = 65535;
const CHANNELS = 3;
const RED = 0;
const GREEN = 1;
const BLUE = 2;

/** L* plane → 8-bit grey plane. */
export function encodeLuma(l: Float32Array, out: Uint8Array = new Uint8Array(l.length)): Uint8Array {
  checkLength(out.length, l.length);
  for (let p = 0; p < l.length; p += 1) {
    out[p] = clamp(Math.round((l[p] * MAX_8BIT) / L_STAR_MAX), MAX_8BIT);
  }
  return out;
}

/** 8-bit grey plane → L* plane (to within half a code step, 0.196 units of L*). */
export function decodeLuma(grey: Uint8Array, out: Float32Array = new Float32Array(grey.length)): Float32Array {
  checkLength(out.length, grey.length);
  for (let p = 0; p < grey.length; p += 1) {
    out[p] = grey[p] / LUMA_SCALE;
  }
  return out;
}

/** a* and b* planes → interleaved 16-bit RGB (3 values a pixel). */
export function encodeChroma(
  a: Float32Array,
  b: Float32Array,
  out: Uint16Array = new Uint16Array(a.length * CHANNELS),
): Uint16Array {
  checkLength(b.length, a.length);
  checkLength(out.length, a.length * CHANNELS);
  for (let p = 0, i = 0; p < a.length; p += 1, i += CHANNELS) {
    out[i + RED] = encodeChromaValue(a[p]);
    out[i + GREEN] = encodeChromaValue(b[p]);
    out[i + BLUE] = 0;
  }
  return out;
}

/** Interleaved 16-bit RGB → a* and b* planes (to within 1/512 of a unit inside −128..127.99). */
export function decodeChroma(rgb: Uint16Array, outA: Float32Array, outB: Float32Array): void {
  checkLength(rgb.length, outA.length * CHANNELS);
  checkLength(outB.length, outA.length);
  for (let p = 0, i = 0; p < outA.length; p += 1, i += CHANNELS) {
    outA[p] = rgb[i + RED] / CHROMA_SCALE - CHROMA_OFFSET;
    outB[p] = rgb[i + GREEN] / CHROMA_SCALE - CHROMA_OFFSET;
  }
}

function encodeChromaValue(c: number): number {
  return clamp(Math.round((c + CHROMA_OFFSET) * CHROMA_SCALE), MAX_16BIT);
}

function clamp(v: number, max: number): number {
  return v < 0 ? 0 : v > max ? max : v;
}

function checkLength(actual: number, expected: number): void {
  if (actual !== expected) {
    throw new RangeError(`buffer holds ${actual} values where ${expected} are needed`);
  }
}
