import type { Readable } from 'node:stream';

/**
 * Where Kinefold keeps sources, derived files and shards: a local folder (the default) or an S3-compatible bucket
 * (KINEFOLD_OBJECT_STORE). Keys are the storage layout of paths.ts relative to the store's root (`objectKeys`), so
 * both stores hold the same names; nothing outside the two implementations turns a key into a place.
 */
export interface ObjectStore {
  /** `folder` or `s3`, for messages and for the few places that may skip work on a local folder. */
  readonly kind: 'folder' | 's3';
  /** Where the objects live, for logs: the folder, or `s3://bucket/prefix`. */
  readonly location: string;
  /** Resolves once the store answers; otherwise rejects with a StoreNotUsable naming the setting to fix. */
  ready(): Promise<void>;
  /**
   * Stores a local file under `key`, streamed (never held in memory). With `move`, the file is gone afterwards:
   * the folder store renames it (one metadata step on the same volume), the S3 store removes it once uploaded.
   */
  putFile(key: string, file: string, options?: { move?: boolean }): Promise<void>;
  /** Stores a stream of unknown length under `key` (multipart in S3). */
  putStream(key: string, body: Readable): Promise<void>;
  putBytes(key: string, bytes: Uint8Array): Promise<void>;
  /** The object's bytes from `range.start` to `range.end` (inclusive) or whole; null when there is no such object. */
  get(key: string, range?: ByteRange): Promise<ObjectRead | null>;
  /** The whole object in memory: for small objects only (a frame, a field, pairset.json). */
  getBytes(key: string): Promise<Buffer | null>;
  /** Copies the object into a local file (created with its folders); false when there is no such object. */
  getFile(key: string, file: string): Promise<boolean>;
  head(key: string): Promise<ObjectHead | null>;
  /** Moves an object to another key: a rename in a folder, a server-side copy then delete in S3. */
  move(fromKey: string, toKey: string): Promise<void>;
  /** Every object whose key is `prefix` or starts with `prefix/`, keys relative to the store's root. */
  list(prefix: string): Promise<StoredObject[]>;
  /** Removes `prefix` and everything under `prefix/`; nothing there is not an error. */
  delete(prefix: string): Promise<void>;
  /** Bytes of every object under `prefix/` (0 when there are none). */
  size(prefix: string): Promise<number>;
}

/** A stored object a request asks for, with what to call it in a 404 when it is not (or no longer) there. */
export interface StoredRef {
  key: string;
  what: string;
}

export interface ByteRange {
  start: number;
  /** Inclusive, as in HTTP's Content-Range. */
  end: number;
}

export interface ObjectHead {
  size: number;
  /** Changes whenever the object's bytes change (a strong or weak HTTP entity tag, quoted). */
  etag: string;
  modified: Date;
}

export interface ObjectRead extends ObjectHead {
  body: Readable;
  /** The bytes `body` carries: the range asked for, or the whole object. */
  range: ByteRange | null;
}

export interface StoredObject {
  key: string;
  size: number;
  modified: Date;
}

/** Joins key parts with `/` whatever the platform, without empty parts. */
export function joinKey(...parts: string[]): string {
  return parts
    .flatMap((part) => part.split('/'))
    .filter(Boolean)
    .join('/');
}

/** A store that does not answer at startup: its message names the variable to fix and is shown without a stack. */
export class StoreNotUsable extends Error {
  constructor(message: string, cause?: unknown) {
    super(message, { cause });
    this.name = 'StoreNotUsable';
  }
}
