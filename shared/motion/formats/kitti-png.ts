// KITTI 2015 16-bit flow encoding, as a raw 3-channel Uint16Array (writing the PNG file is done elsewhere).
// Source: KITTI 2015 devkit readme.txt (Geiger, Menze): u = (ch1 − 2^15)/64, v = (ch2 − 2^15)/64,
// valid = (bool)ch3. Channel order here is the PNG's (R = u, G = v, B = valid); OpenCV reads it as BGR.

import { UNKNOWN_FLOW, isUnknownFlow } from '../unknown-flow';

export const KITTI_OFFSET = 2 ** 15;
export const KITTI_SCALE = 64;
const CHANNELS = 3;
const MAX_CODE = 65535;
/** Largest motion the encoding holds: (65535 − 2^15)/64 = 511.984375 px. */
export const KITTI_MAX_FLOW = (MAX_CODE - KITTI_OFFSET) / KITTI_SCALE;

/** The 16-bit code of one motion component, rounded to the nearest 1/64 px and clamped to the format's range. */
export function encodeKittiComponent(value: number): number {
  return Math.min(MAX_CODE, Math.max(0, Math.round(value * KITTI_SCALE + KITTI_OFFSET)));
}

export function decodeKittiComponent(code: number): number {
  return (code - KITTI_OFFSET) / KITTI_SCALE;
}

/** Encodes an interleaved (u, v) field; unknown pixels get valid = 0 and zero codes. */
export function encodeKittiFlow(flow: Float32Array, out?: Uint16Array): Uint16Array {
  const pixels = flow.length >> 1;
  const codes = out ?? new Uint16Array(pixels * CHANNELS);
  if (codes.length !== pixels * CHANNELS) {
    throw new Error(`KITTI encode: buffer holds ${codes.length} values, ${pixels * CHANNELS} needed`);
  }
  for (let p = 0; p < pixels; p++) {
    const u = flow[2 * p];
    const v = flow[2 * p + 1];
    const known = !isUnknownFlow(u, v);
    codes[CHANNELS * p] = known ? encodeKittiComponent(u) : 0;
    codes[CHANNELS * p + 1] = known ? encodeKittiComponent(v) : 0;
    codes[CHANNELS * p + 2] = known ? 1 : 0;
  }
  return codes;
}

/** Decodes KITTI codes to an interleaved (u, v) field; pixels with valid = 0 become UNKNOWN_FLOW. */
export function decodeKittiFlow(codes: Uint16Array, out?: Float32Array): Float32Array {
  if (codes.length % CHANNELS !== 0) throw new Error(`KITTI decode: ${codes.length} values is not whole RGB pixels`);
  const pixels = codes.length / CHANNELS;
  const flow = out ?? new Float32Array(2 * pixels);
  if (flow.length !== 2 * pixels) {
    throw new Error(`KITTI decode: buffer holds ${flow.length} values, ${2 * pixels} needed`);
  }
  for (let p = 0; p < pixels; p++) {
    const valid = codes[CHANNELS * p + 2] !== 0;
    flow[2 * p] = valid ? decodeKittiComponent(codes[CHANNELS * p]) : UNKNOWN_FLOW;
    flow[2 * p + 1] = valid ? decodeKittiComponent(codes[CHANNELS * p + 1]) : UNKNOWN_FLOW;
  }
  return flow;
}
