import type { SplitName } from './split';

const SHARD_NUMBER_DIGITS = 5;

/** `shard-<split>-<nnnnn>.tar` (DESIGN §7): one number sequence across both splits, the API's shard index. */
export function shardFileName(split: SplitName, index: number): string {
  return `shard-${split}-${String(index).padStart(SHARD_NUMBER_DIGITS, '0')}.tar`;
}
