import { describe, expect, it } from 'vitest';
import {
  KITTI_MAX_FLOW,
  decodeKittiComponent,
  decodeKittiFlow,
  encodeKittiComponent,
  encodeKittiFlow,
} from '../../../shared/motion/formats/kitti-png';
import { UNKNOWN_FLOW, isUnknownFlow } from '../../../shared/motion/unknown-flow.js';

// Source: KITTI 2015 devkit readme.txt (Geiger, Menze): u = (ch1 − 2^15)/64, v = (ch2 − 2^15)/64,
// valid = (bool)ch3 (CHECK-VALUES §3).

describe('KITTI 2015 flow codes', () => {
  it('encodes u = 1.5 as 32864', () => {
    // CHECK-VALUES §3 [C]
    expect(encodeKittiComponent(1.5)).toBe(32864);
    expect(decodeKittiComponent(32864)).toBe(1.5);
  });

  it('holds at most 511.984375 px, the code 65535', () => {
    // CHECK-VALUES §3 [C]
    expect(KITTI_MAX_FLOW).toBe(511.984375);
    expect(encodeKittiComponent(KITTI_MAX_FLOW)).toBe(65535);
    expect(decodeKittiComponent(65535)).toBe(511.984375);
  });

  it('encodes zero motion as 2^15 and clamps beyond the range', () => {
    // CHECK-VALUES §3 [C]: (ch − 2^15)/64 = 0 at ch = 32768; the lowest code 0 is −512 px.
    expect(encodeKittiComponent(0)).toBe(32768);
    expect(encodeKittiComponent(600)).toBe(65535);
    expect(encodeKittiComponent(-600)).toBe(0);
    expect(decodeKittiComponent(0)).toBe(-512);
  });

  it('round-trips within half a code step (1/128 px)', () => {
    // [C] from the 1/64 px step of the encoding.
    for (const value of [-3.3, -0.01, 0.007, 2.718, 100.123]) {
      expect(Math.abs(decodeKittiComponent(encodeKittiComponent(value)) - value)).toBeLessThanOrEqual(1 / 128);
    }
  });
});

describe('KITTI 2015 flow buffers', () => {
  it('writes u, v, valid per pixel and marks unknown pixels invalid', () => {
    const codes = encodeKittiFlow(Float32Array.from([1.5, -0.25, UNKNOWN_FLOW, 0]));
    expect(Array.from(codes)).toEqual([32864, 32752, 1, 0, 0, 0]);
  });

  it('reads invalid pixels back as unknown flow', () => {
    const flow = decodeKittiFlow(Uint16Array.from([32864, 32752, 1, 40000, 40000, 0]));
    expect(Array.from(flow.subarray(0, 2))).toEqual([1.5, -0.25]);
    expect(isUnknownFlow(flow[2], flow[3])).toBe(true);
  });

  it('refuses a buffer that is not whole RGB pixels', () => {
    expect(() => decodeKittiFlow(new Uint16Array(4))).toThrow(/whole RGB pixels/);
  });
});
