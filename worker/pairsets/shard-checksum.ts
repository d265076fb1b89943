import { createHash } from 'node:crypto';
import fs from 'node:fs';
import { Transform } from 'node:stream';
import { pipeline } from 'node:stream/promises';

export interface ShardDigest {
  bytes: number;
  /** SHA-256 as lowercase hex, the form pairset.json and `sha256sum` use. */
  sha256: string;
}

export interface ShardFileSink {
  /** Takes the shard's bytes: hashes them and writes them to the file. */
  stream: Transform;
  /** Resolves with the size and SHA-256 of everything written once the file is complete. */
  done: Promise<ShardDigest>;
}

/** Bytes the file may hold in flight, so packing the next members overlaps writing these. */
const WRITE_BUFFER = 4 * 1024 * 1024;

/**
 * A shard file and its SHA-256 (FIPS 180-4, node:crypto) and size, taken from the bytes on their way to disk, so
 * a shard is never read again. The file is created with `wx`: an existing shard is never overwritten. Disk reads
 * and writes run on libuv's threads meanwhile, so hashing here overlaps with them.
 */
export function shardFileSink(file: string): ShardFileSink {
  const hash = createHash('sha256');
  let bytes = 0;
  const stream = new Transform({
    transform(chunk: Buffer, _encoding, next) {
      hash.update(chunk);
      bytes += chunk.length;
      next(null, chunk);
    },
  });
  const done = pipeline(stream, fs.createWriteStream(file, { flags: 'wx', highWaterMark: WRITE_BUFFER })).then(() => ({
    bytes,
    sha256: hash.digest('hex'),
  }));
  return { stream, done };
}
