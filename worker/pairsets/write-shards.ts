import fs from 'node:fs';
import path from 'node:path';
import { SPLIT_ORDER, type PlannedPair } from '../../shared/pairing/pair-plan';
import { shardFileName } from '../../shared/pairing/shard-name';
import type { SplitName } from '../../shared/pairing/split';
import type { ShardSummary } from '../../shared/types/pairsets';
import type { ClusterOf } from '../../shared/diversity/cluster-balance';
import type { SourceClip, SourceFrame } from '../../server/core/pairsets/pairset-sources';
import { viewMember, type MemberFile, type MemberOptions } from './pair-members';
import { memberNames, pairFolder, pairKey, pairRecord } from './pair-record';
import { openShard } from './shard-writer';
import { stableJson } from './stable-json';

export const SHARD_FORMAT = 'kinefold-shard/1';
const TAR_BLOCK = 512;
const BYTES_PER_MB = 1024 * 1024;
/** Members read ahead of the one being written. */
const READ_AHEAD = 8;

export interface WriteShardsOptions {
  /** Folder the shards are written into (the build's output folder). */
  outDir: string;
  /** Folder for converted members; each is removed once its shard is written. */
  stagingDir: string;
  shardMB: number;
  member: MemberOptions;
  clips: ReadonlyMap<number, SourceClip>;
  /** With a clustering in the definition: each pair.json records its moment's cluster. */
  clusters?: { clusteringId: number; clusterOf: ClusterOf } | null;
  /** Called after each pair with the share of pairs prepared; may throw to stop (cancel, shutdown). */
  progress(share: number): Promise<void>;
}

interface TarEntry {
  name: string;
  /** A file in the staging folder, removed once written, or bytes made in memory. */
  member: MemberFile | { data: Uint8Array };
}

interface PreparedPair {
  key: string;
  entries: TarEntry[];
  tarBytes: number;
}

/**
 * Writes the shards of a plan (DESIGN §7): train shards first, then val, numbered in one sequence. A shard takes
 * pairs in plan order until the next pair would carry it past the size target (a shard always holds at least one
 * pair). Each shard starts with index.json (format, shard number, split, pair keys) followed by every pair's
 * `pairs/<pairKey>/a.<ext>`, `b.<ext>` and `pair.json`, in that order.
 */
export async function writeShards(
  planned: readonly PlannedPair[],
  options: WriteShardsOptions,
): Promise<ShardSummary[]> {
  const targetBytes = options.shardMB * BYTES_PER_MB;
  const frames = new Map(
    [...options.clips.values()].flatMap((clip) =>
      clip.frames.map((frame) => [`${clip.id}:${frame.index}`, frame] as const),
    ),
  );
  const shards: ShardSummary[] = [];
  let done = 0;
  for (const split of SPLIT_ORDER) {
    let batch: PreparedPair[] = [];
    let batchBytes = 0;
    for (const item of planned) {
      if (item.split !== split) continue;
      const prepared = await preparePair(item, frames.get(`${item.clipId}:${item.moment}`)!, options);
      if (batch.length > 0 && batchBytes + prepared.tarBytes > targetBytes) {
        shards.push(await writeShard(batch, shards.length, split, options.outDir));
        batch = [];
        batchBytes = 0;
      }
      batch.push(prepared);
      batchBytes += prepared.tarBytes;
      done += 1;
      await options.progress(done / planned.length);
    }
    if (batch.length > 0) shards.push(await writeShard(batch, shards.length, split, options.outDir));
  }
  return shards;
}

async function preparePair(item: PlannedPair, frame: SourceFrame, options: WriteShardsOptions): Promise<PreparedPair> {
  const { member } = options;
  const clip = options.clips.get(item.clipId)!;
  const key = pairKey(item);
  const folder = pairFolder(item);
  const names = memberNames(item, member.motionFormat);
  const entries: TarEntry[] = [];
  for (const side of ['a', 'b'] as const) {
    const staging = path.join(options.stagingDir, `${key}.${names[side]}`);
    const file = await viewMember(item.pair[side], item.clipId, item.moment, member, staging);
    entries.push({ name: `${folder}/${names[side]}`, member: file });
  }
  const cluster = options.clusters
    ? { clustering: options.clusters.clusteringId, id: options.clusters.clusterOf(item.clipId, item.moment) }
    : undefined;
  const record = Buffer.from(stableJson(pairRecord(item, clip, frame, member.motionFormat, cluster)));
  entries.push({ name: `${folder}/pair.json`, member: { data: record } });
  const tarBytes = entries.reduce((sum, entry) => sum + tarSize(entrySize(entry)), 0);
  return { key, entries, tarBytes };
}

async function writeShard(
  batch: readonly PreparedPair[],
  index: number,
  split: SplitName,
  outDir: string,
): Promise<ShardSummary> {
  const file = shardFileName(split, index);
  const sink = openShard(path.join(outDir, file));
  const entries = batch.flatMap((pair) => pair.entries);
  try {
    const pairs = batch.map((pair) => pair.key);
    const listing = { format: SHARD_FORMAT, shard: index, split, pairCount: batch.length, pairs };
    await sink.add('index.json', Buffer.from(stableJson(listing)));
    // Members ahead are read while this one is hashed and written, so reads, hashing and writes overlap.
    const reads: (Promise<Uint8Array> | null)[] = entries.slice(0, READ_AHEAD).map(prefetch);
    for (let i = 0; i < entries.length; i += 1) {
      const data = await reads[i]!;
      if (i + READ_AHEAD < entries.length) reads.push(prefetch(entries[i + READ_AHEAD]!));
      await sink.add(entries[i]!.name, data);
      reads[i] = null;
    }
    const digest = await sink.close();
    await Promise.all(
      entries.flatMap((entry) => ('file' in entry.member ? [fs.promises.rm(entry.member.file, { force: true })] : [])),
    );
    return { index, file, split, pairCount: batch.length, bytes: digest.bytes, sha256: digest.sha256 };
  } catch (error) {
    await sink.abort(error as Error);
    throw error;
  }
}

/** Starts reading a member; a failure surfaces where it is awaited, never as an unhandled rejection. */
function prefetch(entry: TarEntry): Promise<Uint8Array> {
  const data = 'data' in entry.member ? Promise.resolve(entry.member.data) : fs.promises.readFile(entry.member.file);
  data.catch(() => undefined);
  return data;
}

function entrySize(entry: TarEntry): number {
  return 'data' in entry.member ? entry.member.data.byteLength : entry.member.size;
}

/** Bytes a member takes in a tar: one header block and its data padded to whole blocks. */
function tarSize(size: number): number {
  return TAR_BLOCK + Math.ceil(size / TAR_BLOCK) * TAR_BLOCK;
}
