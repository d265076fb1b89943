// Generated grey frames for signal tests: a textured scene whose content is known, plus blur and noise.
import { mulberry32 } from '../../../shared/pairing/seeded-random';

export interface Texture {
  /** Mean grey level the texture is centred on. */
  mean: number;
  /** Peak amplitude of the pattern around the mean. */
  amplitude: number;
}

const WAVES = 6;
const MAX_GREY = 255;

/** A smooth random pattern (sum of oriented sine waves) with fine noise, clamped to 0..255. */
export function texturedGrey(width: number, height: number, seed: number, texture: Texture): Float32Array {
  const random = mulberry32(seed);
  const waves = Array.from({ length: WAVES }, () => ({
    fx: (random() - 0.5) * 0.6,
    fy: (random() - 0.5) * 0.6,
    phase: random() * 2 * Math.PI,
  }));
  const out = new Float32Array(width * height);
  for (let y = 0; y < height; y += 1) {
    for (let x = 0; x < width; x += 1) {
      let v = 0;
      for (const w of waves) v += Math.sin(w.fx * x + w.fy * y + w.phase);
      const fine = (random() - 0.5) * 0.4;
      out[y * width + x] = clampGrey(texture.mean + texture.amplitude * (v / WAVES + fine));
    }
  }
  return out;
}

/** Adds uniform noise in ±amplitude, clamped to 0..255. */
export function withNoise(grey: Float32Array, amplitude: number, seed: number): Float32Array {
  const random = mulberry32(seed);
  return grey.map((v) => clampGrey(v + (random() * 2 - 1) * amplitude));
}

/** Repeated box blur with edge clamping: a strong low-pass that makes frames blurry. */
export function boxBlur(
  grey: Float32Array,
  width: number,
  height: number,
  radius: number,
  passes: number,
): Float32Array {
  let current = grey;
  for (let pass = 0; pass < passes; pass += 1) {
    const next = new Float32Array(current.length);
    for (let y = 0; y < height; y += 1) {
      for (let x = 0; x < width; x += 1) {
        let sum = 0;
        let count = 0;
        for (let dy = -radius; dy <= radius; dy += 1) {
          for (let dx = -radius; dx <= radius; dx += 1) {
            const yy = Math.min(height - 1, Math.max(0, y + dy));
            const xx = Math.min(width - 1, Math.max(0, x + dx));
            sum += current[yy * width + xx];
            count += 1;
          }
        }
        next[y * width + x] = sum / count;
      }
    }
    current = next;
  }
  return current;
}

function clampGrey(v: number): number {
  return Math.min(MAX_GREY, Math.max(0, v));
}
