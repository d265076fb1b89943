/**
 * JSON with every object's keys in sorted order, so the same data always gives the same bytes, whatever order
 * the database or the code built it in (pairsets are compared byte for byte across rebuilds). Numbers use
 * JavaScript's shortest round-trip form, which is deterministic too.
 */
export function stableJson(value: unknown, indent?: number): string {
  return JSON.stringify(value, (_key, item: unknown) => (isPlainObject(item) ? sortedCopy(item) : item), indent);
}

function isPlainObject(value: unknown): value is Record<string, unknown> {
  return (
    typeof value === 'object' &&
    value !== null &&
    !Array.isArray(value) &&
    Object.getPrototypeOf(value) === Object.prototype
  );
}

/** A copy with keys inserted in code-unit order (integer-like keys still come first, in ascending order). */
function sortedCopy(value: Record<string, unknown>): Record<string, unknown> {
  const sorted: Record<string, unknown> = {};
  for (const key of Object.keys(value).sort()) sorted[key] = value[key];
  return sorted;
}
