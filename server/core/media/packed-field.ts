import zlib from 'node:zlib';
import { UNKNOWN_FLOW, isUnknownFlow } from '../../../shared/motion/unknown-flow';

/**
 * Kinefold's stored form of a motion field ("packed field", `motion/<t>.field`), a fraction of a float32 .flo:
 * u and v rounded to 1/64 px in 16-bit codes, the precision of the KITTI 2015 flow encoding (devkit readme:
 * u = (code − 2^15)/64), so every stored component is within 1/128 px of the computed one; unknown pixels keep a
 * code of their own. Each code is stored as its difference from the left neighbour (the pixel above for the first
 * column), which a smooth field turns into runs of small numbers, and the planes are compressed with zlib's
 * deflate (RFC 1950/1951). A field with any component beyond ±511.98 px, which 16 bits cannot hold at that step, is
 * stored as float32 planes instead, so the bound holds for every field. An optional bit plane keeps the
 * per-pixel forward–backward consistency, so the backward field need not be stored at all.
 *
 * Layout, little-endian: "KFPF", version u8 (1), encoding u8 (1 = int16 at 1/64 px, 2 = float32), planes u8
 * (bit 0: consistency plane), 0 u8, width u32, height u32, then the deflated body: u plane, v plane, consistency
 * bits (pixel p in byte p >> 3, bit p & 7).
 */

export const PACKED_FIELD_MAGIC = 'KFPF';
const VERSION = 1;
const HEADER_BYTES = 16;
const ENCODING_INT16 = 1;
const ENCODING_FLOAT32 = 2;
const HAS_CONSISTENCY = 1;
/** Codes per pixel: 64 per px, as KITTI 2015. */
export const PACKED_FIELD_STEPS_PER_PX = 64;
/** The code of an unknown component; known ones stay within ±32767. */
const UNKNOWN_CODE = -32768;
const MAX_CODE = 32767;
/** zlib's default level: within a few per cent of level 9 on fields, at a fraction of its time. */
const DEFLATE_LEVEL = 6;

export interface PackedFieldContent {
  width: number;
  height: number;
  /** u, v interleaved per pixel, row order; unknown pixels as UNKNOWN_FLOW. */
  flow: Float32Array;
  /** 1 where the pixel passed the forward–backward check, or null when not stored. */
  consistent: Uint8Array | null;
}

export function encodePackedField({ width, height, flow, consistent }: PackedFieldContent): Buffer {
  const pixels = width * height;
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) {
    throw new Error(`packed field: illegal size ${width}x${height}`);
  }
  if (flow.length !== 2 * pixels)
    throw new Error(`packed field: a ${width}x${height} field needs ${2 * pixels} values`);
  if (consistent && consistent.length !== pixels) throw new Error(`packed field: consistency needs ${pixels} values`);
  const codes = quantise(flow, pixels);
  const planes = codes ? deltaPlanes(codes, width, height) : floatPlanes(flow, pixels);
  const bits = consistent ? packBits(consistent) : new Uint8Array(0);
  const body = Buffer.concat([Buffer.from(planes.buffer, planes.byteOffset, planes.byteLength), bits]);
  const header = Buffer.alloc(HEADER_BYTES);
  header.write(PACKED_FIELD_MAGIC, 0, 'latin1');
  header.writeUInt8(VERSION, 4);
  header.writeUInt8(codes ? ENCODING_INT16 : ENCODING_FLOAT32, 5);
  header.writeUInt8(consistent ? HAS_CONSISTENCY : 0, 6);
  header.writeUInt32LE(width, 8);
  header.writeUInt32LE(height, 12);
  return Buffer.concat([header, zlib.deflateSync(body, { level: DEFLATE_LEVEL })]);
}

export function decodePackedField(bytes: Uint8Array): PackedFieldContent {
  const data = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (data.length < HEADER_BYTES || data.toString('latin1', 0, 4) !== PACKED_FIELD_MAGIC) {
    throw new Error('packed field: not a Kinefold packed field (no KFPF tag)');
  }
  const version = data.readUInt8(4);
  if (version !== VERSION) throw new Error(`packed field: version ${version} is not known`);
  const encoding = data.readUInt8(5);
  const hasConsistency = (data.readUInt8(6) & HAS_CONSISTENCY) !== 0;
  const width = data.readUInt32LE(8);
  const height = data.readUInt32LE(12);
  const pixels = width * height;
  const planeBytes = encoding === ENCODING_INT16 ? 4 * pixels : 8 * pixels;
  if (encoding !== ENCODING_INT16 && encoding !== ENCODING_FLOAT32) {
    throw new Error(`packed field: encoding ${encoding} is not known`);
  }
  const body = zlib.inflateSync(data.subarray(HEADER_BYTES));
  const expected = planeBytes + (hasConsistency ? Math.ceil(pixels / 8) : 0);
  if (body.length !== expected) {
    throw new Error(`packed field: a ${width}x${height} field needs ${expected} bytes, the file holds ${body.length}`);
  }
  // Copied out so the planes are aligned for typed-array views whatever inflate returned.
  const planes = new Uint8Array(body.subarray(0, planeBytes));
  const flow =
    encoding === ENCODING_INT16
      ? unpackCodes(new Int16Array(planes.buffer), width, height)
      : interleave(new Float32Array(planes.buffer), pixels);
  const consistent = hasConsistency ? unpackBits(body.subarray(planeBytes), pixels) : null;
  return { width, height, flow, consistent };
}

/** The 1/64 px codes of u then v, or null when a component is beyond what 16 bits hold at that step. */
function quantise(flow: Float32Array, pixels: number): Int16Array | null {
  const codes = new Int16Array(2 * pixels);
  for (let p = 0; p < pixels; p++) {
    const u = flow[2 * p]!;
    const v = flow[2 * p + 1]!;
    if (isUnknownFlow(u, v)) {
      codes[p] = UNKNOWN_CODE;
      codes[pixels + p] = UNKNOWN_CODE;
      continue;
    }
    const cu = Math.round(u * PACKED_FIELD_STEPS_PER_PX);
    const cv = Math.round(v * PACKED_FIELD_STEPS_PER_PX);
    if (Math.abs(cu) > MAX_CODE || Math.abs(cv) > MAX_CODE) return null;
    codes[p] = cu;
    codes[pixels + p] = cv;
  }
  return codes;
}

/** Each code minus its predictor (left neighbour, or the pixel above in the first column), wrapping in 16 bits. */
function deltaPlanes(codes: Int16Array, width: number, height: number): Int16Array {
  const deltas = new Int16Array(codes.length);
  const pixels = width * height;
  for (let plane = 0; plane < 2; plane++) {
    const base = plane * pixels;
    for (let p = 0; p < pixels; p++) {
      const predictor = p === 0 ? 0 : p % width === 0 ? codes[base + p - width]! : codes[base + p - 1]!;
      deltas[base + p] = codes[base + p]! - predictor;
    }
  }
  return deltas;
}

function unpackCodes(deltas: Int16Array, width: number, height: number): Float32Array {
  const pixels = width * height;
  const codes = new Int16Array(deltas.length);
  for (let plane = 0; plane < 2; plane++) {
    const base = plane * pixels;
    for (let p = 0; p < pixels; p++) {
      const predictor = p === 0 ? 0 : p % width === 0 ? codes[base + p - width]! : codes[base + p - 1]!;
      codes[base + p] = deltas[base + p]! + predictor;
    }
  }
  const flow = new Float32Array(2 * pixels);
  for (let p = 0; p < pixels; p++) {
    const cu = codes[p]!;
    const cv = codes[pixels + p]!;
    const unknown = cu === UNKNOWN_CODE || cv === UNKNOWN_CODE;
    flow[2 * p] = unknown ? UNKNOWN_FLOW : cu / PACKED_FIELD_STEPS_PER_PX;
    flow[2 * p + 1] = unknown ? UNKNOWN_FLOW : cv / PACKED_FIELD_STEPS_PER_PX;
  }
  return flow;
}

/** u then v as float32 planes, unknown pixels as UNKNOWN_FLOW. */
function floatPlanes(flow: Float32Array, pixels: number): Float32Array {
  const planes = new Float32Array(2 * pixels);
  for (let p = 0; p < pixels; p++) {
    const unknown = isUnknownFlow(flow[2 * p]!, flow[2 * p + 1]!);
    planes[p] = unknown ? UNKNOWN_FLOW : flow[2 * p]!;
    planes[pixels + p] = unknown ? UNKNOWN_FLOW : flow[2 * p + 1]!;
  }
  return planes;
}

function interleave(planes: Float32Array, pixels: number): Float32Array {
  const flow = new Float32Array(2 * pixels);
  for (let p = 0; p < pixels; p++) {
    flow[2 * p] = planes[p]!;
    flow[2 * p + 1] = planes[pixels + p]!;
  }
  return flow;
}

function packBits(values: Uint8Array): Uint8Array {
  const bits = new Uint8Array(Math.ceil(values.length / 8));
  for (let p = 0; p < values.length; p++) if (values[p]) bits[p >> 3]! |= 1 << (p & 7);
  return bits;
}

function unpackBits(bits: Uint8Array, pixels: number): Uint8Array {
  const values = new Uint8Array(pixels);
  for (let p = 0; p < pixels; p++) values[p] = (bits[p >> 3]! >> (p & 7)) & 1;
  return values;
}
