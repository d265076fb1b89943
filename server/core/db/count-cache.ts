/**
 * List totals, reused for a moment. Every page of the review queue and the clip list also counts its matches, and
 * on 100,000 clips the count is the dearest part of the request (the page itself reads 50 rows by index). While 50
 * people page through lists, the same few counts are asked many times a second: each is now computed once and
 * shared until a write of this process (write-queue.ts reports every one) or COUNT_REUSE_MS, whichever comes
 * first. The worker's writes, made in another process, show in totals at most COUNT_REUSE_MS late.
 */
export const COUNT_REUSE_MS = 2_000;
const MAX_COUNTS = 500;

let generation = 0;
const counts = new Map<string, { generation: number; at: number; total: Promise<number> }>();

/** Called after each write of this process: every count made before it may be out of date. */
export function noteWrite(): void {
  generation += 1;
}

/** The count for `key` (the statement and its values), computed by `count` unless a fresh one is at hand. */
export function reusedCount(key: string, count: () => Promise<number>, now = Date.now()): Promise<number> {
  const known = counts.get(key);
  if (known && known.generation === generation && now - known.at < COUNT_REUSE_MS) return known.total;
  const total = count();
  counts.delete(key);
  counts.set(key, { generation, at: now, total });
  if (counts.size > MAX_COUNTS) counts.delete(counts.keys().next().value!);
  total.catch(() => counts.delete(key));
  return total;
}
