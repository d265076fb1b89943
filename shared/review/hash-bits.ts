/**
 * 64-bit perceptual hashes (dHash, worker/signals/perceptual-hash.ts) as the database stores them, 16 hex digits,
 * and the Hamming distance between two of them: used by the duplicate flag in the worker and by the side-by-side
 * comparison in the server.
 */

const HEX_DIGITS = 16;
const HEX_RADIX = 16;
const HALF_BITS = 32n;
const LOW_MASK = 0xffffffffn;
const HEX_PATTERN = /^[0-9a-f]{16}$/i;

export function hashToHex(hash: bigint): string {
  return hash.toString(HEX_RADIX).padStart(HEX_DIGITS, '0');
}

export function hexToHash(hex: string): bigint {
  if (!HEX_PATTERN.test(hex)) throw new RangeError(`not a 64-bit hex hash: ${hex}`);
  return BigInt(`0x${hex}`);
}

/** Number of differing bits of two 64-bit hashes. */
export function hammingDistance(a: bigint, b: bigint): number {
  const x = a ^ b;
  return popcount32(Number(x & LOW_MASK)) + popcount32(Number((x >> HALF_BITS) & LOW_MASK));
}

/** Set bits of a 32-bit integer (the classic SWAR bit count). */
export function popcount32(value: number): number {
  let v = value >>> 0;
  v -= (v >>> 1) & 0x55555555;
  v = (v & 0x33333333) + ((v >>> 2) & 0x33333333);
  v = (v + (v >>> 4)) & 0x0f0f0f0f;
  return Math.imul(v, 0x01010101) >>> 24;
}
