import { describe, expect, it } from 'vitest';
import { FLO_TAG_FLOAT, decodeFlo, encodeFlo, floByteLength } from '../../../shared/motion/formats/flo';
import { UNKNOWN_FLOW, isUnknownFlow } from '../../../shared/motion/unknown-flow.js';

// Source for every check here: D. Scharstein, Middlebury optical flow `flow-code` (README.txt, flowIO.cpp,
// flowIO.h), the .flo format of Baker et al., "A Database and Evaluation Methodology for Optical Flow",
// IJCV 92(1), 2011 (CHECK-VALUES §1).

const WIDTH = 3;
const HEIGHT = 2;
// Distinct values per component so that a swapped u/v or a wrong row order shows.
const FIELD = Float32Array.from([0.5, -1.25, 2, 3.5, -4.75, 6, 7.125, -8, 9.5, 10.25, -11, 12.5]);

function view(bytes: Uint8Array): DataView {
  return new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

describe('.flo encoding', () => {
  it('starts with the tag "PIEH" = 50 49 45 48', () => {
    // CHECK-VALUES §1 [V]
    const bytes = encodeFlo(FIELD, WIDTH, HEIGHT);
    expect(Array.from(bytes.subarray(0, 4))).toEqual([0x50, 0x49, 0x45, 0x48]);
  });

  it('has a tag that reads as the little-endian float 202021.25', () => {
    // CHECK-VALUES §1 [C]: flowIO.cpp compares the tag as a float with TAG_FLOAT.
    const tag = new DataView(Uint8Array.from([0x50, 0x49, 0x45, 0x48]).buffer).getFloat32(0, true);
    expect(tag).toBe(202021.25);
    expect(FLO_TAG_FLOAT).toBe(tag);
  });

  it('stores width and height as little-endian int32 at bytes 4 and 8', () => {
    // CHECK-VALUES §1 [V]
    const d = view(encodeFlo(FIELD, WIDTH, HEIGHT));
    expect(d.getInt32(4, true)).toBe(WIDTH);
    expect(d.getInt32(8, true)).toBe(HEIGHT);
  });

  it('is 12 + 8·w·h bytes long', () => {
    // CHECK-VALUES §1 [C]
    expect(encodeFlo(FIELD, WIDTH, HEIGHT).byteLength).toBe(12 + 8 * WIDTH * HEIGHT);
    expect(floByteLength(640, 480)).toBe(2457612); // grove3.flo's size on disk [C]
  });

  it('writes u and v interleaved in row order from byte 12', () => {
    // CHECK-VALUES §1 [V]: u[r0,c0], v[r0,c0], u[r0,c1], …
    const d = view(encodeFlo(FIELD, WIDTH, HEIGHT));
    const row1col2 = 1 * WIDTH + 2;
    expect(d.getFloat32(12, true)).toBe(0.5);
    expect(d.getFloat32(16, true)).toBe(-1.25);
    expect(d.getFloat32(12 + 8 * row1col2, true)).toBe(-11);
    expect(d.getFloat32(12 + 8 * row1col2 + 4, true)).toBe(12.5);
  });

  it('round-trips a field bit for bit', () => {
    // CHECK-VALUES §1 [V]: values are stored as float32, so a Float32Array field survives unchanged.
    const decoded = decodeFlo(encodeFlo(FIELD, WIDTH, HEIGHT));
    expect(decoded.width).toBe(WIDTH);
    expect(decoded.height).toBe(HEIGHT);
    expect(decoded.flow).toEqual(FIELD);
  });

  it('reads a file held in a larger buffer at an offset (as Node Buffers often are)', () => {
    const bytes = encodeFlo(FIELD, WIDTH, HEIGHT);
    const larger = new Uint8Array(bytes.byteLength + 7);
    larger.set(bytes, 3);
    expect(decodeFlo(larger.subarray(3, 3 + bytes.byteLength)).flow).toEqual(FIELD);
  });
});

describe('.flo unknown flow', () => {
  it('keeps the writer sentinel 1e10 and reads it as unknown', () => {
    // CHECK-VALUES §1 [V]: UNKNOWN_FLOW 1e10; unknown when |u| or |v| > 1e9.
    expect(UNKNOWN_FLOW).toBe(1e10);
    const field = Float32Array.from([UNKNOWN_FLOW, UNKNOWN_FLOW, 1, 2]);
    const back = decodeFlo(encodeFlo(field, 2, 1)).flow;
    expect(back[0]).toBe(1e10);
    expect(isUnknownFlow(back[0], back[1])).toBe(true);
    expect(isUnknownFlow(back[2], back[3])).toBe(false);
  });

  it('treats |u| > 1e9, |v| > 1e9 and NaN as unknown, and exactly 1e9 as known', () => {
    // CHECK-VALUES §1 [V]: UNKNOWN_FLOW_THRESH 1e9, compared with ">".
    expect(isUnknownFlow(1e9, 0)).toBe(false);
    expect(isUnknownFlow(-1e9, 1e9)).toBe(false);
    expect(isUnknownFlow(1.5e9, 0)).toBe(true);
    expect(isUnknownFlow(0, -1.5e9)).toBe(true);
    expect(isUnknownFlow(Number.NaN, 0)).toBe(true);
    expect(isUnknownFlow(0, Number.NaN)).toBe(true);
  });
});

describe('.flo rejections', () => {
  const good = (): Uint8Array => encodeFlo(FIELD, WIDTH, HEIGHT);

  it('refuses a wrong tag', () => {
    const bytes = good();
    bytes[3] = 0x49;
    expect(() => decodeFlo(bytes)).toThrow(/wrong tag/);
  });

  it('refuses sizes outside 1..99999', () => {
    // CHECK-VALUES §1 [V]: flowIO.cpp's sanity check.
    for (const [w, h] of [
      [0, 2],
      [3, 0],
      [-1, 2],
      [100000, 1],
      [1, 100000],
    ]) {
      const bytes = good();
      view(bytes).setInt32(4, w, true);
      view(bytes).setInt32(8, h, true);
      expect(() => decodeFlo(bytes), `${w}x${h}`).toThrow(/illegal size/);
    }
  });

  it('refuses a file shorter than its header says', () => {
    expect(() => decodeFlo(good().subarray(0, floByteLength(WIDTH, HEIGHT) - 1))).toThrow(/too short/);
    expect(() => decodeFlo(good().subarray(0, 11))).toThrow(/header/);
  });

  it('refuses trailing bytes', () => {
    // CHECK-VALUES §1 [V]: flowIO.cpp fails when bytes remain after the last value.
    const bytes = new Uint8Array(floByteLength(WIDTH, HEIGHT) + 1);
    bytes.set(good());
    expect(() => decodeFlo(bytes)).toThrow(/1 trailing bytes/);
  });

  it('refuses to encode a field whose length does not match its size', () => {
    expect(() => encodeFlo(FIELD, WIDTH + 1, HEIGHT)).toThrow(/needs 16 values, got 12/);
    expect(() => encodeFlo(new Float32Array(0), 0, 0)).toThrow(/width must be/);
  });
});
