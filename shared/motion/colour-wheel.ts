// Motion-field colour pictures with the standard optical-flow colour wheel: hue gives direction, saturation
// gives speed relative to a maximum (zero motion is white), unknown motion is black.
// Source: a port of D. Scharstein's Middlebury `flow-code` colorcode.cpp and color_flow.cpp (after the colour
// wheel of Baker et al., "A Database and Evaluation Methodology for Optical Flow", IJCV 92(1), 2011).
// Arithmetic is in double precision, like the common Python ports. The C code stores floats, so at a few exact
// boundaries its truncation lands one level lower (computed with float32: (0, −1) gives red 87 instead of 88).
// It writes BGR; Kinefold writes RGB.

import { isUnknownFlow } from './unknown-flow.js';

// Segment lengths from colorcode.cpp, where they follow perceptual similarity (one tells more shades apart
// between red and yellow than between yellow and green).
const RY = 15;
const YG = 6;
const GC = 4;
const CB = 11;
const BM = 13;
const MR = 6;
export const WHEEL_COLOURS = RY + YG + GC + CB + BM + MR; // 55
const FULL = 255;
const OUT_OF_RANGE_DIMMING = 0.75;
const CHANNELS = 3;

function buildWheel(): Uint8Array {
  const wheel = new Uint8Array(WHEEL_COLOURS * CHANNELS);
  let k = 0;
  const put = (r: number, g: number, b: number): void => {
    wheel[k++] = r;
    wheel[k++] = g;
    wheel[k++] = b;
  };
  // Math.trunc mirrors the C integer division.
  for (let i = 0; i < RY; i++) put(FULL, Math.trunc((FULL * i) / RY), 0);
  for (let i = 0; i < YG; i++) put(FULL - Math.trunc((FULL * i) / YG), FULL, 0);
  for (let i = 0; i < GC; i++) put(0, FULL, Math.trunc((FULL * i) / GC));
  for (let i = 0; i < CB; i++) put(0, FULL - Math.trunc((FULL * i) / CB), FULL);
  for (let i = 0; i < BM; i++) put(Math.trunc((FULL * i) / BM), 0, FULL);
  for (let i = 0; i < MR; i++) put(FULL, 0, FULL - Math.trunc((FULL * i) / MR));
  return wheel;
}

/** The 55 wheel entries as RGB triples, in colorcode.cpp's order (red → yellow → … → magenta). */
export const COLOUR_WHEEL: Readonly<Uint8Array> = buildWheel();

/**
 * Writes the RGB colour of one normalised motion vector (fx, fy), as computeColor() does: radius 1 is full
 * saturation, beyond 1 the colour is dimmed. Image y points down, so (0, 1) is downward motion.
 */
export function colourOfMotion(fx: number, fy: number, out: Uint8Array, offset: number): void {
  const rad = Math.sqrt(fx * fx + fy * fy);
  // The sign of a zero component matters here: atan2(0, −1) = π but atan2(−0, −1) = −π.
  const a = Math.atan2(-fy, -fx) / Math.PI;
  const fk = ((a + 1) / 2) * (WHEEL_COLOURS - 1);
  const k0 = Math.trunc(fk);
  const k1 = (k0 + 1) % WHEEL_COLOURS;
  const f = fk - k0;
  for (let c = 0; c < CHANNELS; c++) {
    const col0 = COLOUR_WHEEL[k0 * CHANNELS + c] / FULL;
    const col1 = COLOUR_WHEEL[k1 * CHANNELS + c] / FULL;
    let col = (1 - f) * col0 + f * col1;
    // Saturation grows with radius inside the unit circle; motion beyond the maximum is dimmed.
    col = rad <= 1 ? 1 - rad * (1 - col) : col * OUT_OF_RANGE_DIMMING;
    out[offset + c] = Math.trunc(FULL * col);
  }
}

/** Largest motion radius over known pixels of an interleaved (u, v) field; 0 when none is known. */
export function maxMotionRadius(flow: Float32Array): number {
  let maxRadius = 0;
  for (let i = 0; i < flow.length; i += 2) {
    const u = flow[i];
    const v = flow[i + 1];
    if (isUnknownFlow(u, v)) continue;
    const rad = Math.sqrt(u * u + v * v);
    if (rad > maxRadius) maxRadius = rad;
  }
  return maxRadius;
}

export interface MotionPicture {
  /** width·height·3 bytes, RGB, row order. */
  rgb: Uint8Array;
  /** The radius that maps to full saturation (record it to draw a matching legend). */
  maxMotion: number;
}

/**
 * Colours a whole field. Motion is divided by `maxMotion` when given (> 0), so pictures of one clip share a
 * scale; otherwise by the field's own largest known radius, as color_flow.cpp does. A field without any
 * motion is divided by 1.
 */
export function motionToColour(flow: Float32Array, maxMotion?: number, out?: Uint8Array): MotionPicture {
  const pixels = flow.length >> 1;
  const rgb = out ?? new Uint8Array(pixels * CHANNELS);
  if (rgb.length !== pixels * CHANNELS) {
    throw new Error(`motion picture buffer holds ${rgb.length} bytes, ${pixels * CHANNELS} needed`);
  }
  let scale = maxMotion !== undefined && maxMotion > 0 ? maxMotion : maxMotionRadius(flow);
  if (scale === 0) scale = 1;
  for (let p = 0; p < pixels; p++) {
    const u = flow[2 * p];
    const v = flow[2 * p + 1];
    if (isUnknownFlow(u, v)) {
      rgb[p * CHANNELS] = 0;
      rgb[p * CHANNELS + 1] = 0;
      rgb[p * CHANNELS + 2] = 0;
    } else {
      colourOfMotion(u / scale, v / scale, rgb, p * CHANNELS);
    }
  }
  return { rgb, maxMotion: scale };
}

/**
 * A size×size RGB legend: the pixel at offset (dx, dy) from the centre shows the colour of motion
 * (dx, dy)/half-size, so the inscribed circle is full saturation and the corners show dimmed out-of-range motion.
 */
export function colourWheelLegend(size: number): Uint8Array {
  if (!Number.isInteger(size) || size < 2) throw new Error(`legend size must be an integer ≥ 2, got ${size}`);
  const rgb = new Uint8Array(size * size * CHANNELS);
  const centre = (size - 1) / 2;
  for (let y = 0; y < size; y++) {
    for (let x = 0; x < size; x++) {
      colourOfMotion((x - centre) / centre, (y - centre) / centre, rgb, (y * size + x) * CHANNELS);
    }
  }
  return rgb;
}
