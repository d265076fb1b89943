import path from 'node:path';
import { pipeline } from 'node:stream/promises';
import type { Request, Response } from 'express';
import { HttpStatus } from '../../shared/http-status';
import { notFound } from '../core/errors';
import type { ObjectStore, StoredRef } from '../core/storage/object-store';

/**
 * Streams a stored object as sendFile streamed files: one byte range answered 206 (resumed downloads, video
 * seeking), an unsatisfiable one 416, a matching If-None-Match or If-Modified-Since 304, several ranges the whole
 * object. The bytes pass through the server whichever store holds them (GetObject with Range for S3) rather than
 * through presigned URLs: sessions and API tokens stay the only way in, the links a page holds never expire, the
 * store need not be reachable from people's machines, and both stores answer the same URLs.
 */
export async function sendStored(
  req: Request,
  res: Response,
  store: ObjectStore,
  ref: StoredRef,
  headers: Record<string, string> = {},
): Promise<void> {
  const head = await store.head(ref.key);
  if (!head) throw notFound(ref.what);
  res.set({ 'Accept-Ranges': 'bytes', ETag: head.etag, 'Last-Modified': head.modified.toUTCString(), ...headers });
  if (!res.get('Content-Type')) res.type(path.extname(ref.key) || 'application/octet-stream');
  if (req.fresh) {
    res.status(HttpStatus.NOT_MODIFIED).end();
    return;
  }
  const ranges = req.headers.range && rangeStillValid(req, head.etag) ? req.range(head.size) : undefined;
  if (ranges === -1) {
    res.status(HttpStatus.RANGE_NOT_SATISFIABLE).set('Content-Range', `bytes */${head.size}`).end();
    return;
  }
  const range = Array.isArray(ranges) && ranges.type === 'bytes' && ranges.length === 1 ? ranges[0] : undefined;
  const read = await store.get(ref.key, range);
  if (!read) throw notFound(ref.what);
  if (range) {
    res.status(HttpStatus.PARTIAL_CONTENT).set('Content-Range', `bytes ${range.start}-${range.end}/${read.size}`);
  }
  res.set('Content-Length', String(range ? range.end - range.start + 1 : read.size));
  if (req.method === 'HEAD') {
    read.body.destroy();
    res.end();
    return;
  }
  // A client that hangs up mid-download ends the pipeline early; that is not a server fault.
  await pipeline(read.body, res).catch((error: NodeJS.ErrnoException) => {
    if (error.code !== 'ERR_STREAM_PREMATURE_CLOSE') throw error;
  });
}

/** If-Range (RFC 9110 §13.1.5): a range against another version of the object gets the whole new one. */
function rangeStillValid(req: Request, etag: string): boolean {
  const ifRange = req.headers['if-range'];
  return !ifRange || ifRange === etag;
}
