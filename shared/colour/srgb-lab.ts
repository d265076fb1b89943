/**
 * sRGB ↔ CIE L*a*b* (D65 white, 2° observer), per pixel and over whole images.
 *
 * Sources:
 * - sRGB transfer functions: IEC 61966-2-1:1999, as written in colour-science
 *   (`colour/models/rgb/transfer_functions/srgb.py`) and scikit-image (`skimage/color/colorconv.py`).
 * - Linear sRGB → XYZ matrix and D65 white (0.95047, 1, 1.08883): scikit-image `colorconv.py`; the same matrix
 *   is printed in OpenCV's "Color conversions" documentation. We use it rather than Lindbloom's 7-digit matrix
 *   because it is the one read in a source; both reproduce Lindbloom's reference table to 0.01. The inverse
 *   matrix is the exact inverse of this one (as scikit-image does), so 8-bit round trips are exact.
 * - XYZ ↔ L*a*b* with ε = 216/24389 and κ = 24389/27 in exact rational form, per Bruce Lindbloom's
 *   CIE equations.
 */

export interface Xyz {
  x: number;
  y: number;
  z: number;
}

export interface Lab {
  l: number;
  a: number;
  b: number;
}

/** Gamma-encoded or linear RGB, each channel 0..1 (or 0..255 where a name says 8-bit). */
export type RgbTriple = [number, number, number];

/** Whole-image L*, a*, b* planes, one value per pixel, written by the image functions. */
export interface LabPlanes {
  l: Float32Array;
  a: Float32Array;
  b: Float32Array;
}

export const D65_WHITE: Readonly<Xyz> = Object.freeze({ x: 0.95047, y: 1, z: 1.08883 });
export const LAB_EPSILON = 216 / 24389;
export const LAB_KAPPA = 24389 / 27;

const SRGB_DECODE_KNEE = 0.04045;
const SRGB_ENCODE_KNEE = 0.0031308;
const SRGB_LINEAR_SLOPE = 12.92;
const SRGB_OFFSET = 0.055;
const SRGB_GAMMA = 2.4;
const MAX_8BIT = 255;
const CHANNELS = 3;

/** Rows: X, Y, Z from linear R, G, B (scikit-image `xyz_from_rgb`). */
const XYZ_FROM_RGB: readonly number[] = [
  0.412453, 0.35758, 0.180423, 0.212671, 0.71516, 0.072169, 0.019334, 0.119193, 0.950227,
];
const RGB_FROM_XYZ: readonly number[] = invert3x3(XYZ_FROM_RGB);

/** Decoding 8-bit values is the hot path of whole images, so it goes through a 256-entry table. */
const DECODE_8BIT: Float64Array = Float64Array.from({ length: MAX_8BIT + 1 }, (_, v) => srgbDecode(v / MAX_8BIT));

/** Gamma-encoded sRGB channel (0..1) → linear light (0..1). */
export function srgbDecode(c: number): number {
  return c <= SRGB_DECODE_KNEE ? c / SRGB_LINEAR_SLOPE : ((c + SRGB_OFFSET) / (1 + SRGB_OFFSET)) ** SRGB_GAMMA;
}

/** Linear light (0..1) → gamma-encoded sRGB channel (0..1). */
export function srgbEncode(c: number): number {
  return c <= SRGB_ENCODE_KNEE ? SRGB_LINEAR_SLOPE * c : (1 + SRGB_OFFSET) * c ** (1 / SRGB_GAMMA) - SRGB_OFFSET;
}

export function linearRgbToXyz(r: number, g: number, b: number): Xyz {
  const m = XYZ_FROM_RGB;
  return {
    x: m[0] * r + m[1] * g + m[2] * b,
    y: m[3] * r + m[4] * g + m[5] * b,
    z: m[6] * r + m[7] * g + m[8] * b,
  };
}

export function xyzToLinearRgb(xyz: Xyz): RgbTriple {
  const m = RGB_FROM_XYZ;
  return [
    m[0] * xyz.x + m[1] * xyz.y + m[2] * xyz.z,
    m[3] * xyz.x + m[4] * xyz.y + m[5] * xyz.z,
    m[6] * xyz.x + m[7] * xyz.y + m[8] * xyz.z,
  ];
}

export function xyzToLab(xyz: Xyz, white: Readonly<Xyz> = D65_WHITE): Lab {
  const fx = labF(xyz.x / white.x);
  const fy = labF(xyz.y / white.y);
  const fz = labF(xyz.z / white.z);
  return { l: 116 * fy - 16, a: 500 * (fx - fy), b: 200 * (fy - fz) };
}

export function labToXyz(lab: Lab, white: Readonly<Xyz> = D65_WHITE): Xyz {
  const fy = (lab.l + 16) / 116;
  const fx = fy + lab.a / 500;
  const fz = fy - lab.b / 200;
  const yr = lab.l > LAB_KAPPA * LAB_EPSILON ? fy ** 3 : lab.l / LAB_KAPPA;
  return { x: labFInverse(fx) * white.x, y: yr * white.y, z: labFInverse(fz) * white.z };
}

/** Gamma-encoded sRGB, channels 0..1 → L*a*b*. */
export function srgbToLab(r: number, g: number, b: number): Lab {
  return xyzToLab(linearRgbToXyz(srgbDecode(r), srgbDecode(g), srgbDecode(b)));
}

/** L*a*b* → gamma-encoded sRGB, channels 0..1; colours outside the sRGB gamut are clipped per channel. */
export function labToSrgb(lab: Lab): RgbTriple {
  const [r, g, b] = xyzToLinearRgb(labToXyz(lab));
  return [srgbEncode(clampUnit(r)), srgbEncode(clampUnit(g)), srgbEncode(clampUnit(b))];
}

export function srgb8ToLab(r: number, g: number, b: number): Lab {
  return xyzToLab(linearRgbToXyz(DECODE_8BIT[r], DECODE_8BIT[g], DECODE_8BIT[b]));
}

export function labToSrgb8(lab: Lab): RgbTriple {
  const [r, g, b] = labToSrgb(lab);
  return [Math.round(r * MAX_8BIT), Math.round(g * MAX_8BIT), Math.round(b * MAX_8BIT)];
}

/** Interleaved 8-bit RGB (3 bytes a pixel) → L*, a*, b* planes written into `out`. */
export function rgbImageToLab(rgb: Uint8Array, out: LabPlanes): void {
  const pixels = checkSizes(rgb.length, out);
  for (let p = 0, i = 0; p < pixels; p += 1, i += CHANNELS) {
    const lab = srgb8ToLab(rgb[i], rgb[i + 1], rgb[i + 2]);
    out.l[p] = lab.l;
    out.a[p] = lab.a;
    out.b[p] = lab.b;
  }
}

/** L*, a*, b* planes → interleaved 8-bit RGB written into `out` (3 bytes a pixel). */
export function labImageToRgb(lab: LabPlanes, out: Uint8Array): void {
  const pixels = checkSizes(out.length, lab);
  for (let p = 0, i = 0; p < pixels; p += 1, i += CHANNELS) {
    const [r, g, b] = labToSrgb8({ l: lab.l[p], a: lab.a[p], b: lab.b[p] });
    out[i] = r;
    out[i + 1] = g;
    out[i + 2] = b;
  }
}

function labF(t: number): number {
  return t > LAB_EPSILON ? Math.cbrt(t) : (LAB_KAPPA * t + 16) / 116;
}

function labFInverse(f: number): number {
  const cube = f ** 3;
  return cube > LAB_EPSILON ? cube : (116 * f - 16) / LAB_KAPPA;
}

function clampUnit(v: number): number {
  return v < 0 ? 0 : v > 1 ? 1 : v;
}

function checkSizes(rgbLength: number, planes: LabPlanes): number {
  const pixels = rgbLength / CHANNELS;
  if (
    !Number.isInteger(pixels) ||
    planes.l.length !== pixels ||
    planes.a.length !== pixels ||
    planes.b.length !== pixels
  ) {
    throw new RangeError(`RGB buffer of ${rgbLength} bytes does not match L*a*b* planes of ${planes.l.length}`);
  }
  return pixels;
}

/** Inverse of a row-major 3×3 matrix by cofactors; the matrix here is fixed and well conditioned. */
function invert3x3(m: readonly number[]): number[] {
  const [a, b, c, d, e, f, g, h, i] = m;
  const c00 = e * i - f * h;
  const c01 = f * g - d * i;
  const c02 = d * h - e * g;
  const det = a * c00 + b * c01 + c * c02;
  return [
    c00 / det,
    (c * h - b * i) / det,
    (b * f - c * e) / det,
    c01 / det,
    (a * i - c * g) / det,
    (c * d - a * f) / det,
    c02 / det,
    (b * g - a * h) / det,
    (a * e - b * d) / det,
  ];
}
