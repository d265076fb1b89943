import { describe, expect, it } from 'vitest';
import { createFixedEmbedder, DEFAULT_FIXED_EMBEDDING } from '../../../shared/pairing/fixed-embedding';
import { cosineSimilarity } from '../../../shared/pairing/pair-difficulty';
import { viewPlane } from '../../../shared/pairing/view-plane';
import { texturedGrey } from '../signals/synthetic-frames';

const WIDTH = 64;
const HEIGHT = 48;

function norm(v: Float32Array): number {
  return Math.sqrt(v.reduce((s, x) => s + x * x, 0));
}

describe('fixed embedding', () => {
  const embed = createFixedEmbedder();
  const scene = texturedGrey(WIDTH, HEIGHT, 1, { mean: 120, amplitude: 70 });

  it('gives unit vectors of the chosen size, the same for the same seed', () => {
    const e = embed(scene, WIDTH, HEIGHT);
    expect(e).toHaveLength(DEFAULT_FIXED_EMBEDDING.dims);
    expect(norm(e)).toBeCloseTo(1, 5);
    expect(createFixedEmbedder()(scene, WIDTH, HEIGHT)).toEqual(e);
    const other = createFixedEmbedder({ ...DEFAULT_FIXED_EMBEDDING, seed: 2 })(scene, WIDTH, HEIGHT);
    expect(other).not.toEqual(e);
  });

  it('ignores brightness and contrast: a·x + b embeds like x', () => {
    // Mean removal and L2 normalisation make the embedding invariant to positive affine changes [C].
    const changed = scene.map((v) => 0.4 * v + 30);
    expect(cosineSimilarity(embed(scene, WIDTH, HEIGHT), embed(changed, WIDTH, HEIGHT))).toBeCloseTo(1, 5);
  });

  it('approximates the correlation of thumbnails: the same scene at another size scores high, another low', () => {
    // A random Gaussian projection keeps inner products approximately (Johnson–Lindenstrauss [M]); the bounds
    // here are loose on purpose.
    const other = texturedGrey(WIDTH, HEIGHT, 2, { mean: 120, amplitude: 70 });
    const e = embed(scene, WIDTH, HEIGHT);
    expect(cosineSimilarity(e, embed(other, WIDTH, HEIGHT))).toBeLessThan(0.5);
    const half = new Float32Array((WIDTH / 2) * (HEIGHT / 2)).map((_, i) => {
      const [x, y] = [i % (WIDTH / 2), Math.floor(i / (WIDTH / 2))];
      return scene[2 * y * WIDTH + 2 * x];
    });
    expect(cosineSimilarity(e, embed(half, WIDTH / 2, HEIGHT / 2))).toBeGreaterThan(0.9);
  });

  it('embeds a flat plane to the zero vector', () => {
    expect(norm(embed(new Float32Array(WIDTH * HEIGHT).fill(50), WIDTH, HEIGHT))).toBe(0);
  });
});

describe('view planes', () => {
  it('reduces each view kind to one plane', () => {
    const size = { width: 2, height: 1 };
    expect(Array.from(viewPlane({ kind: 'frame', ...size, rgb: Uint8Array.from([255, 255, 255, 0, 0, 0]) }))).toEqual(
      [255, 0].map(Math.fround),
    );
    expect(Array.from(viewPlane({ kind: 'luma', ...size, l: Float32Array.from([12, 34]) }))).toEqual([12, 34]);
    // CIE chroma C*ab = √(a*² + b*²) [C].
    const chroma = viewPlane({ kind: 'chroma', ...size, a: Float32Array.from([3, 0]), b: Float32Array.from([4, -2]) });
    expect(Array.from(chroma)).toEqual([5, 2]);
    // Middlebury flow: |u| or |v| above 1e9 is unknown flow (CHECK-VALUES §1 [V]); it counts as no motion here.
    const [u, v] = [Float32Array.from([6, 1e10]), Float32Array.from([8, 0])];
    const motion = viewPlane({ kind: 'motion', ...size, u, v });
    expect(Array.from(motion)).toEqual([10, 0]);
  });
});
