import { describe, expect, it } from 'vitest';
import {
  D65_WHITE,
  labImageToRgb,
  labToSrgb8,
  labToXyz,
  rgbImageToLab,
  srgb8ToLab,
  srgbDecode,
  srgbEncode,
  srgbToLab,
  xyzToLab,
  type Lab,
  type LabPlanes,
} from '../../../shared/colour/srgb-lab';

const LAB_TOLERANCE = 0.01;

function expectLabClose(actual: Lab, expected: [number, number, number], tolerance: number): void {
  expect(Math.abs(actual.l - expected[0])).toBeLessThanOrEqual(tolerance);
  expect(Math.abs(actual.a - expected[1])).toBeLessThanOrEqual(tolerance);
  expect(Math.abs(actual.b - expected[2])).toBeLessThanOrEqual(tolerance);
}

function planes(pixels: number): LabPlanes {
  return { l: new Float32Array(pixels), a: new Float32Array(pixels), b: new Float32Array(pixels) };
}

describe('sRGB → CIE L*a*b* (D65)', () => {
  // Source: scikit-image `skimage/color/tests/test_colorconv.py::test_rgb2lab_brucelindbloom`, values "from the
  // calculator on the authoritative Bruce Lindbloom website" (CHECK-VALUES §5 [V]); tolerance 0.01 because the
  // scikit-image matrix leaves about ±0.005 on white.
  const reference: [string, [number, number, number], [number, number, number]][] = [
    ['white', [255, 255, 255], [100, 0, 0]],
    ['black', [0, 0, 0], [0, 0, 0]],
    ['red', [255, 0, 0], [53.2408, 80.0925, 67.2032]],
    ['green', [0, 255, 0], [87.7347, -86.1827, 83.1793]],
    ['blue', [0, 0, 255], [32.297, 79.1875, -107.8602]],
    ['yellow', [255, 255, 0], [97.1393, -21.5537, 94.478]],
    ['cyan', [0, 255, 255], [91.1132, -48.0875, -14.1312]],
    ['magenta', [255, 0, 255], [60.3242, 98.2343, -60.8249]],
  ];

  it.each(reference)('%s matches the Lindbloom reference value (8-bit input)', (_name, rgb, lab) => {
    expectLabClose(srgb8ToLab(...rgb), lab, LAB_TOLERANCE);
  });

  it.each(reference)('%s matches the Lindbloom reference value (0..1 input)', (_name, rgb, lab) => {
    const [r, g, b] = rgb.map((v) => v / 255);
    expectLabClose(srgbToLab(r, g, b), lab, LAB_TOLERANCE);
  });

  it('gives the computed grey levels', () => {
    // CHECK-VALUES §5 [C]: 128 → linear 0.215861 and L* 53.5850; 119 → 50.0344; 1 → 0.2742 (below ε, the linear
    // branch of f). For greys Y equals the linear value, so these do not depend on the matrix.
    expect(srgbDecode(128 / 255)).toBeCloseTo(0.215861, 6);
    expect(srgb8ToLab(128, 128, 128).l).toBeCloseTo(53.585, 4);
    expect(srgb8ToLab(119, 119, 119).l).toBeCloseTo(50.0344, 4);
    expect(srgb8ToLab(1, 1, 1).l).toBeCloseTo(0.2742, 4);
    // Neutral greys keep a* and b* within the tolerance: the white point belongs to the same matrix (§5 [C]).
    expectLabClose(srgb8ToLab(128, 128, 128), [53.585, 0, 0], LAB_TOLERANCE);
  });

  it('reproduces the colour-science XYZ → L*a*b* example with its own white', () => {
    // colour-science `XYZ_to_Lab` docs example (CHECK-VALUES §5 [V, reproduced C]). colour-science derives the
    // D65 white from the chromaticity xy = (0.3127, 0.3290), not from the scikit-image white we use by default.
    const x = 0.3127;
    const y = 0.329;
    const white = { x: x / y, y: 1, z: (1 - x - y) / y };
    const lab = xyzToLab({ x: 0.20654008, y: 0.12197225, z: 0.05136952 }, white);
    expect(lab.l).toBeCloseTo(41.5278752, 6);
    expect(lab.a).toBeCloseTo(52.638583, 6);
    expect(lab.b).toBeCloseTo(26.9231792, 6);
  });

  it('inverts L*a*b* → XYZ on both branches of f', () => {
    // Lindbloom's inverse equations with ε = 216/24389, κ = 24389/27 (CHECK-VALUES §5): XYZ → Lab → XYZ is the
    // identity, including dark values below ε where the linear branch applies [C].
    for (const xyz of [
      { x: 0.3, y: 0.4, z: 0.5 },
      { x: 0.001, y: 0.002, z: 0.0005 },
      { x: 0.9, y: 0.05, z: 1.0 },
    ]) {
      const back = labToXyz(xyzToLab(xyz));
      expect(back.x).toBeCloseTo(xyz.x, 12);
      expect(back.y).toBeCloseTo(xyz.y, 12);
      expect(back.z).toBeCloseTo(xyz.z, 12);
    }
    expect(D65_WHITE).toEqual({ x: 0.95047, y: 1, z: 1.08883 }); // scikit-image `illuminants` D65, 2° [V]
  });

  it('encodes what it decodes (IEC 61966-2-1 transfer functions)', () => {
    // The decode/encode pair of CHECK-VALUES §5 [V] are inverses up to the 1e-7 gap at the knee of the standard.
    for (let v = 0; v <= 255; v += 1) expect(srgbEncode(srgbDecode(v / 255))).toBeCloseTo(v / 255, 6);
  });
});

describe('whole images', () => {
  it('round-trips every 8-bit colour of a grid exactly through L*a*b* planes', () => {
    // Round trip sRGB → L*a*b* → sRGB on 8-bit values (CHECK-VALUES §5): the inverse matrix is the exact inverse,
    // so after rounding every value comes back [C]. Grid step 3 covers 0 and 255 on every channel.
    const levels = Array.from({ length: 86 }, (_, i) => i * 3);
    const pixels = levels.length ** 3;
    const rgb = new Uint8Array(pixels * 3);
    let i = 0;
    for (const r of levels) for (const g of levels) for (const b of levels) rgb.set([r, g, b], i++ * 3);
    const lab = planes(pixels);
    rgbImageToLab(rgb, lab);
    const back = new Uint8Array(rgb.length);
    labImageToRgb(lab, back);
    expect(Buffer.compare(Buffer.from(back), Buffer.from(rgb))).toBe(0);
  });

  it('writes the same values as the per-pixel conversion', () => {
    const rgb = Uint8Array.from([255, 0, 0, 10, 200, 30]);
    const lab = planes(2);
    rgbImageToLab(rgb, lab);
    const second = srgb8ToLab(10, 200, 30);
    expect([lab.l[1], lab.a[1], lab.b[1]]).toEqual([second.l, second.a, second.b].map(Math.fround));
    expect(labToSrgb8({ l: lab.l[0], a: lab.a[0], b: lab.b[0] })).toEqual([255, 0, 0]);
  });

  it('refuses buffers of different sizes', () => {
    expect(() => rgbImageToLab(new Uint8Array(6), planes(3))).toThrow(RangeError);
    expect(() => labImageToRgb(planes(2), new Uint8Array(5))).toThrow(RangeError);
  });
});
