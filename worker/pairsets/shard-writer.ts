import { pipeline } from 'node:stream/promises';
import tar from 'tar-stream';
import { shardFileSink, type ShardDigest } from './shard-checksum';

/**
 * Writes one shard: a POSIX ustar archive (tar-stream) whose every header is fixed so that the same members give
 * the same bytes: mode 0644, mtime 0 (1970-01-01), uid and gid 0, empty user and group names, regular files only.
 * tar-stream pads each member to 512-byte blocks and ends the archive with two zero blocks (1024 bytes); it does
 * not pad to a 10240-byte record, which POSIX readers do not need. The SHA-256 and size are taken from the bytes
 * as they go to disk (shard-checksum.ts), so the file is never read twice.
 */

const FILE_MODE = 0o644;
const EPOCH = new Date(0);
/** Bytes tar-stream may hold before the file takes them, so packing the next member overlaps writing this one. */
const STREAM_BUFFER = 4 * 1024 * 1024;

export interface ShardSink {
  /** Appends one member; resolves once tar-stream has taken it (it waits while the disk catches up). */
  add(name: string, data: Uint8Array): Promise<void>;
  /** Ends the archive and waits until it is on disk. */
  close(): Promise<ShardDigest>;
  /** Stops writing after a failure; the caller removes the file. */
  abort(error: Error): Promise<void>;
}

/** Opens `file` (which must not exist) for a new shard. */
export function openShard(file: string): ShardSink {
  const pack = tar.pack({ highWaterMark: STREAM_BUFFER });
  const sink = shardFileSink(file);
  const written = Promise.all([pipeline(pack, sink.stream), sink.done]).then(([, digest]) => digest);
  // A failure surfaces through add() or close(); this keeps it from being reported as unhandled meanwhile.
  written.catch(() => undefined);
  return {
    add(name, data) {
      const header = {
        name,
        size: data.byteLength,
        mode: FILE_MODE,
        mtime: EPOCH,
        uid: 0,
        gid: 0,
        uname: '',
        gname: '',
        type: 'file' as const,
      };
      return new Promise<void>((resolve, reject) => {
        pack.entry(header, Buffer.from(data.buffer, data.byteOffset, data.byteLength), (error) =>
          error ? reject(error) : resolve(),
        );
      }).catch(async (error: unknown) => {
        await written.catch(() => undefined);
        throw error;
      });
    },
    async close() {
      pack.finalize();
      return written;
    },
    async abort(error) {
      pack.destroy(error);
      await written.catch(() => undefined);
    },
  };
}
