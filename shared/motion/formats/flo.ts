// Middlebury .flo motion-field files: encode and decode.
// Source: D. Scharstein, Middlebury optical flow `flow-code` (README.txt, flowIO.cpp, flowIO.h); format of
// Baker et al., "A Database and Evaluation Methodology for Optical Flow", IJCV 92(1), 2011.
// Layout, all little-endian: "PIEH" (float 202021.25), int32 width, int32 height, then width*height pairs of
// float32 (u, v) in row order. Unknown motion is stored as UNKNOWN_FLOW (see shared/motion/unknown-flow.ts).

/** The tag "PIEH" read as a little-endian float32; flowIO.cpp checks the tag this way. */
export const FLO_TAG_FLOAT = 202021.25;
/** The tag's bytes: 'P' 'I' 'E' 'H'. */
export const FLO_TAG_BYTES: readonly number[] = [0x50, 0x49, 0x45, 0x48];
/** flowIO.cpp rejects sizes outside 1..99999 as a sanity check. */
export const FLO_MAX_SIDE = 99999;
export const FLO_HEADER_BYTES = 12;

const BYTES_PER_PIXEL = 8; // two float32 values
const LITTLE_ENDIAN = true;

export interface DecodedFlo {
  width: number;
  height: number;
  /** u, v interleaved per pixel, row order; unknown pixels keep their stored values. */
  flow: Float32Array;
}

/** Bytes of a .flo file holding `width`×`height` pixels: 12 + 8·w·h. */
export function floByteLength(width: number, height: number): number {
  return FLO_HEADER_BYTES + BYTES_PER_PIXEL * width * height;
}

function assertSide(name: string, value: number): void {
  if (!Number.isInteger(value) || value < 1 || value > FLO_MAX_SIDE) {
    throw new Error(`.flo ${name} must be an integer in 1..${FLO_MAX_SIDE}, got ${value}`);
  }
}

/** Encodes an interleaved (u, v) field as a .flo file. */
export function encodeFlo(flow: Float32Array, width: number, height: number): Uint8Array {
  assertSide('width', width);
  assertSide('height', height);
  const values = 2 * width * height;
  if (flow.length !== values) {
    throw new Error(`.flo encode: a ${width}x${height} field needs ${values} values, got ${flow.length}`);
  }
  const bytes = new Uint8Array(floByteLength(width, height));
  const view = new DataView(bytes.buffer);
  bytes.set(FLO_TAG_BYTES, 0);
  view.setInt32(4, width, LITTLE_ENDIAN);
  view.setInt32(8, height, LITTLE_ENDIAN);
  for (let i = 0; i < values; i++) view.setFloat32(FLO_HEADER_BYTES + 4 * i, flow[i], LITTLE_ENDIAN);
  return bytes;
}

/** Decodes a .flo file, refusing a wrong tag, implausible sizes, a short file and trailing bytes. */
export function decodeFlo(bytes: Uint8Array): DecodedFlo {
  if (bytes.byteLength < FLO_HEADER_BYTES) {
    throw new Error(`.flo decode: ${bytes.byteLength} bytes is shorter than the ${FLO_HEADER_BYTES}-byte header`);
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const tag = view.getFloat32(0, LITTLE_ENDIAN);
  if (tag !== FLO_TAG_FLOAT) {
    const found = Array.from(bytes.subarray(0, 4), (b) => b.toString(16).padStart(2, '0')).join(' ');
    throw new Error(`.flo decode: wrong tag (bytes ${found}, expected 50 49 45 48 "PIEH")`);
  }
  const width = view.getInt32(4, LITTLE_ENDIAN);
  const height = view.getInt32(8, LITTLE_ENDIAN);
  if (width < 1 || width > FLO_MAX_SIDE || height < 1 || height > FLO_MAX_SIDE) {
    throw new Error(`.flo decode: illegal size ${width}x${height} (each side must be 1..${FLO_MAX_SIDE})`);
  }
  const expected = floByteLength(width, height);
  if (bytes.byteLength < expected) {
    const needs = `a ${width}x${height} field needs ${expected}`;
    throw new Error(`.flo decode: file too short: ${bytes.byteLength} bytes, ${needs}`);
  }
  if (bytes.byteLength > expected) {
    throw new Error(`.flo decode: ${bytes.byteLength - expected} trailing bytes after a ${width}x${height} field`);
  }
  const flow = new Float32Array(2 * width * height);
  for (let i = 0; i < flow.length; i++) flow[i] = view.getFloat32(FLO_HEADER_BYTES + 4 * i, LITTLE_ENDIAN);
  return { width, height, flow };
}
