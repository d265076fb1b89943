import { reusedReads } from './reused-reads';

/**
 * List totals, reused for a moment. Every page of the review queue and the clip list also counts its matches, and
 * on 100,000 clips the count is the dearest part of the request (the page itself reads 50 rows by index). While 50
 * people page through lists, the same few counts are asked many times a second: each is now computed once and
 * shared until a write of this process or COUNT_REUSE_MS, whichever comes first (reused-reads.ts). The worker's
 * writes, made in another process, show in totals at most COUNT_REUSE_MS late.
 */
export const COUNT_REUSE_MS = 2_000;
const MAX_COUNTS = 500;

const counts = reusedReads<number>(COUNT_REUSE_MS, MAX_COUNTS);

/** The count for `key` (the statement and its values), computed by `count` unless a fresh one is at hand. */
export function reusedCount(key: string, count: () => Promise<number>, now = Date.now()): Promise<number> {
  return counts.read(key, count, now);
}
