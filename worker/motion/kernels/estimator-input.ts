// Argument checks shared by the motion estimators, so a bad call fails with a message that names the problem
// instead of producing a field of NaN.

export function assertFramePair(prev: Float32Array, next: Float32Array, width: number, height: number): void {
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) {
    throw new Error(`motion: frame size must be positive integers, got ${width}x${height}`);
  }
  const pixels = width * height;
  if (prev.length !== pixels || next.length !== pixels) {
    const got = `${prev.length} and ${next.length}`;
    throw new Error(`motion: ${width}x${height} frames need ${pixels} values each, got ${got}`);
  }
}

/** The caller's output buffer after checking its length, or a new one. */
export function outputField(width: number, height: number, out?: Float32Array): Float32Array {
  const values = 2 * width * height;
  if (out === undefined) return new Float32Array(values);
  if (out.length !== values) throw new Error(`motion: output holds ${out.length} values, ${values} needed`);
  return out;
}
