// Motion workspace: named scratch buffers that estimators reuse from one frame pair to the next.
// One workspace per thread. Each buffer grows lazily to the largest size asked for and never shrinks, so a
// clip of equal-sized frames allocates its large typed arrays once. Buffers are not cleared between uses:
// every caller writes a buffer completely before reading it (the determinism tests check this).

export class MotionWorkspace {
  private readonly float32Buffers = new Map<string, Float32Array>();
  private readonly float64Buffers = new Map<string, Float64Array>();

  /** A Float32Array view of exactly `length` elements, backed by the buffer kept under `key`. */
  float32(key: string, length: number): Float32Array {
    let buffer = this.float32Buffers.get(key);
    if (buffer === undefined || buffer.length < length) {
      buffer = new Float32Array(length);
      this.float32Buffers.set(key, buffer);
    }
    return buffer.subarray(0, length);
  }

  /** A Float64Array view of exactly `length` elements, backed by the buffer kept under `key`. */
  float64(key: string, length: number): Float64Array {
    let buffer = this.float64Buffers.get(key);
    if (buffer === undefined || buffer.length < length) {
      buffer = new Float64Array(length);
      this.float64Buffers.set(key, buffer);
    }
    return buffer.subarray(0, length);
  }

  /** Total bytes held, for monitoring how large a long-lived workspace has grown. */
  get byteLength(): number {
    let total = 0;
    for (const buffer of this.float32Buffers.values()) total += buffer.byteLength;
    for (const buffer of this.float64Buffers.values()) total += buffer.byteLength;
    return total;
  }
}
