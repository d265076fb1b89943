import fs from 'node:fs';
import path from 'node:path';
import type { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import {
  CopyObjectCommand,
  DeleteObjectCommand,
  DeleteObjectsCommand,
  GetObjectCommand,
  HeadBucketCommand,
  HeadObjectCommand,
  paginateListObjectsV2,
  S3Client,
  type S3ServiceException,
} from '@aws-sdk/client-s3';
import { Upload } from '@aws-sdk/lib-storage';
import { joinKey, StoreNotUsable, type ObjectHead, type ObjectStore, type StoredObject } from './object-store';

export interface S3Location {
  bucket: string;
  /** Key prefix inside the bucket, without slashes at either end ('' for the bucket's root). */
  prefix: string;
}

/** How long the startup check waits for the store before saying it cannot be reached. */
const READY_TIMEOUT_MS = 10_000;
/** DeleteObjects takes at most this many keys a request (S3 API reference, DeleteObjects). */
const DELETE_BATCH = 1000;
/** Parts in flight per upload: lib-storage buffers queueSize × partSize (5 MiB) bytes, never the whole file. */
const UPLOAD_QUEUE = 4;

/**
 * An S3-compatible bucket through the official AWS SDK: uploads stream as multipart (lib-storage), reads stream
 * GetObject bodies with HTTP ranges, moves are server-side copies. Every object key is `prefix/key`.
 */
export function createS3Store(client: S3Client, { bucket, prefix }: S3Location, endpoint: string | null): ObjectStore {
  const fullKey = (key: string) => joinKey(prefix, key);
  const relativeKey = (full: string) => (prefix ? full.slice(prefix.length + 1) : full);

  async function upload(key: string, body: Readable | Uint8Array): Promise<void> {
    await new Upload({ client, params: { Bucket: bucket, Key: fullKey(key), Body: body }, queueSize: UPLOAD_QUEUE })
      .done();
  }

  async function head(key: string): Promise<ObjectHead | null> {
    try {
      const answer = await client.send(new HeadObjectCommand({ Bucket: bucket, Key: fullKey(key) }));
      return { size: answer.ContentLength ?? 0, etag: answer.ETag ?? '""', modified: answer.LastModified ?? new Date(0) };
    } catch (error) {
      if (isMissing(error)) return null;
      throw error;
    }
  }

  async function list(prefixKey: string): Promise<StoredObject[]> {
    const found: StoredObject[] = [];
    const exact = await head(prefixKey);
    if (exact) found.push({ key: prefixKey, size: exact.size, modified: exact.modified });
    const pages = paginateListObjectsV2({ client }, { Bucket: bucket, Prefix: `${fullKey(prefixKey)}/` });
    for await (const page of pages) {
      for (const object of page.Contents ?? []) {
        if (!object.Key) continue;
        found.push({ key: relativeKey(object.Key), size: object.Size ?? 0, modified: object.LastModified ?? new Date(0) });
      }
    }
    return found.sort((a, b) => a.key.localeCompare(b.key));
  }

  const store: ObjectStore = {
    kind: 's3',
    location: `s3://${joinKey(bucket, prefix)}`,
    async ready() {
      try {
        await client.send(new HeadBucketCommand({ Bucket: bucket }), { abortSignal: AbortSignal.timeout(READY_TIMEOUT_MS) });
      } catch (error) {
        throw new StoreNotUsable(
          `KINEFOLD_OBJECT_STORE: bucket "${bucket}" cannot be reached${endpoint ? ` at KINEFOLD_S3_ENDPOINT ${endpoint}` : ''} ` +
            `(${reasonOf(error)}). Check the bucket, the endpoint, and AWS_ACCESS_KEY_ID / AWS_SECRET_ACCESS_KEY / AWS_REGION.`,
          error,
        );
      }
    },
    putFile: async (key, file, options = {}) => {
      await upload(key, fs.createReadStream(file));
      if (options.move) await fs.promises.rm(file, { force: true });
    },
    putStream: (key, body) => upload(key, body),
    putBytes: (key, bytes) => upload(key, bytes),
    async get(key, range) {
      try {
        const answer = await client.send(
          new GetObjectCommand({
            Bucket: bucket,
            Key: fullKey(key),
            Range: range ? `bytes=${range.start}-${range.end}` : undefined,
          }),
        );
        const size = range ? totalOf(answer.ContentRange) : (answer.ContentLength ?? 0);
        return {
          size,
          etag: answer.ETag ?? '""',
          modified: answer.LastModified ?? new Date(0),
          body: answer.Body as Readable,
          range: range ?? null,
        };
      } catch (error) {
        if (isMissing(error)) return null;
        throw error;
      }
    },
    async getBytes(key) {
      const read = await store.get(key);
      if (!read) return null;
      const chunks: Buffer[] = [];
      for await (const chunk of read.body) chunks.push(chunk as Buffer);
      return Buffer.concat(chunks);
    },
    async getFile(key, file) {
      const read = await store.get(key);
      if (!read) return false;
      await fs.promises.mkdir(path.dirname(file), { recursive: true });
      await pipeline(read.body, fs.createWriteStream(file));
      return true;
    },
    head,
    async move(fromKey, toKey) {
      const source = `${bucket}/${fullKey(fromKey).split('/').map(encodeURIComponent).join('/')}`;
      await client.send(new CopyObjectCommand({ Bucket: bucket, Key: fullKey(toKey), CopySource: source }));
      await client.send(new DeleteObjectCommand({ Bucket: bucket, Key: fullKey(fromKey) }));
    },
    list,
    async delete(prefixKey) {
      const keys = (await list(prefixKey)).map((object) => ({ Key: fullKey(object.key) }));
      for (let start = 0; start < keys.length; start += DELETE_BATCH) {
        const batch = keys.slice(start, start + DELETE_BATCH);
        const answer = await client.send(
          new DeleteObjectsCommand({ Bucket: bucket, Delete: { Objects: batch, Quiet: true } }),
        );
        const failed = answer.Errors?.[0];
        if (failed) throw new Error(`Could not remove ${failed.Key} from the object store: ${failed.Message}`);
      }
    },
    async size(prefixKey) {
      return (await list(prefixKey)).reduce((sum, object) => sum + object.size, 0);
    },
  };
  return store;
}

/** The service's own words where it gave some; a bare 403/404 from HeadBucket has no body. */
function reasonOf(error: unknown): string {
  const answer = error as Partial<S3ServiceException>;
  const status = answer.$metadata?.httpStatusCode;
  if (status === 404) return 'no such bucket';
  if (status === 403) return 'access denied: the credentials are refused or lack the right to this bucket';
  if (answer.name === 'TimeoutError' || answer.name === 'AbortError') return `no answer in ${READY_TIMEOUT_MS / 1000} s`;
  return answer.message || answer.name || String(error);
}

function isMissing(error: unknown): boolean {
  const answer = error as Partial<S3ServiceException>;
  return answer.name === 'NoSuchKey' || answer.name === 'NotFound' || answer.$metadata?.httpStatusCode === 404;
}

/** The object's full size from a Content-Range answer (`bytes 0-99/1234`). */
function totalOf(contentRange: string | undefined): number {
  const total = Number(contentRange?.split('/')[1]);
  if (!Number.isFinite(total)) throw new Error(`The object store answered a range without its size (${contentRange}).`);
  return total;
}
