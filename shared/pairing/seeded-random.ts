/**
 * Deterministic pseudo-randomness for splits, batch order and projections: the same seed gives the same
 * numbers in the browser, the server and the worker.
 * - mulberry32: a 32-bit generator by Tommy Ettinger (2017, public domain) [M]; period 2^32, ample for
 *   shuffling a sample and drawing a projection matrix, not for cryptography.
 * - Box–Muller transform for normal deviates (Box & Muller, "A Note on the Generation of Random Normal
 *   Deviates", Ann. Math. Statist. 29(2), 1958 [M]).
 * - Fisher–Yates shuffle (Knuth, The Art of Computer Programming vol. 2, Algorithm P [M]).
 * - FNV-1a 32-bit string hash (Fowler, Noll, Vo; public domain), over UTF-8 bytes, followed by the MurmurHash3
 *   32-bit finaliser `fmix32` (Austin Appleby [M]) so every output bit depends on every input bit.
 */

export type RandomSource = () => number;

const UINT32_RANGE = 2 ** 32;
const MULBERRY_INCREMENT = 0x6d2b79f5;
const FNV_OFFSET_BASIS = 0x811c9dc5;
const FNV_PRIME = 0x01000193;
const FMIX_MULTIPLIER_1 = 0x85ebca6b;
const FMIX_MULTIPLIER_2 = 0xc2b2ae35;
const UTF8 = new TextEncoder();

/** A generator of uniform numbers in [0, 1) from a 32-bit seed. */
export function mulberry32(seed: number): RandomSource {
  let state = seed >>> 0;
  return () => {
    state = (state + MULBERRY_INCREMENT) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / UINT32_RANGE;
  };
}

/** One standard normal deviate (mean 0, variance 1) from two uniform draws. */
export function standardNormal(random: RandomSource): number {
  const u1 = 1 - random(); // in (0, 1], so the logarithm is finite
  const u2 = random();
  return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
}

/** Shuffles `items` in place with a seeded generator and returns it. */
export function shuffleInPlace<T>(items: T[], random: RandomSource): T[] {
  for (let i = items.length - 1; i > 0; i -= 1) {
    const j = Math.floor(random() * (i + 1));
    [items[i], items[j]] = [items[j], items[i]];
  }
  return items;
}

/** FNV-1a over the UTF-8 bytes of `text`, as an unsigned 32-bit integer. */
export function fnv1a32(text: string): number {
  let hash = FNV_OFFSET_BASIS;
  for (const byte of UTF8.encode(text)) {
    hash = Math.imul(hash ^ byte, FNV_PRIME);
  }
  return hash >>> 0;
}

/** MurmurHash3's 32-bit finaliser: a bijection on 32-bit integers with full avalanche. */
export function fmix32(h: number): number {
  let x = h >>> 0;
  x ^= x >>> 16;
  x = Math.imul(x, FMIX_MULTIPLIER_1);
  x ^= x >>> 13;
  x = Math.imul(x, FMIX_MULTIPLIER_2);
  x ^= x >>> 16;
  return x >>> 0;
}
