import { randomUUID } from 'node:crypto';
import { FileStore } from '@tus/file-store';
import { Server, type ServerOptions, type Upload } from '@tus/server';
import type { Request as ExpressRequest, RequestHandler } from 'express';
import type { ApiErrorBody } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import { AppError } from '../core/errors';
import {
  admitResumableUpload,
  openResumableUpload,
  resumableUploader,
  type ResumableMetadata,
} from '../core/clips/resumable-upload';
import type { ObjectStore } from '../core/storage/object-store';
import type { StoragePaths } from '../core/storage/paths';
import { releaseUpload } from '../core/usage/quotas';
import { tooLarge } from './upload';

/** The request a tus hook sees; under Express its Node request is the Express one, signed in and checked. */
type TusRequest = Parameters<NonNullable<ServerOptions['onIncomingRequest']>>[0];

/**
 * A tus file store whose uploads hold a quota reservation under the same id: an upload that could not be created
 * or that its sender terminates gives its bytes back at once.
 */
class ReservedFileStore extends FileStore {
  override async create(upload: Upload): Promise<Upload> {
    try {
      return await super.create(upload);
    } catch (error) {
      await releaseUpload(upload.id);
      throw error;
    }
  }

  override async remove(uploadId: string): Promise<void> {
    await super.remove(uploadId);
    await releaseUpload(uploadId);
  }
}

export interface ResumableUploadOptions {
  paths: StoragePaths;
  store: ObjectStore;
  limitBytes: number;
  publicUrl: string;
  /** Where the uploads live in the API, for the Location of a new upload. */
  route: string;
}

/**
 * Resumable uploads on the tus protocol (1.0.0, creation and termination): the file arrives over as many PATCH
 * requests as the connection needs, each picking up at the offset the server holds, across reloads and restarts.
 * Creation checks the metadata and reserves the declared length (Upload-Length) exactly as the multipart route
 * reserves Content-Length; the last byte triggers the same admission (duplicate, probe), and the clip comes back
 * as JSON in the answer to the final PATCH. Refusals answer `{ error: { code, message } }` like every other route.
 */
export function resumableUploadEngine({
  paths,
  store,
  limitBytes,
  publicUrl,
  route,
}: ResumableUploadOptions): RequestHandler {
  /** Uploads whose last byte is in and whose admission runs: asked about meanwhile, they answer 423 (retry). */
  const admitting = new Set<string>();

  const createServer = () =>
    new Server({
      path: route,
      relativeLocation: true,
      datastore: new ReservedFileStore({ directory: paths.resumableDir }),
      namingFunction: () => randomUUID(),
      async onIncomingRequest(req, uploadId) {
        if (req.method === 'POST') return;
        if (admitting.has(uploadId)) {
          throw new AppError(
            HttpStatus.LOCKED,
            'upload_being_checked',
            'This upload is complete and being checked; ask again shortly.',
          );
        }
        // Another person's upload is answered as if it did not exist.
        if ((await resumableUploader(uploadId)) !== uploaderOf(req)) throw uploadGone();
      },
      async onUploadCreate(req, upload) {
        if (upload.size === undefined) {
          throw new AppError(
            HttpStatus.LENGTH_REQUIRED,
            'length_required',
            'Uploads must declare their size (Upload-Length) so quotas can be checked first.',
          );
        }
        if (upload.size > limitBytes) throw tooLarge(limitBytes, upload.size);
        await openResumableUpload(upload.id, upload.metadata as ResumableMetadata, uploaderOf(req), upload.size);
        return {};
      },
      async onUploadFinish(req, upload) {
        admitting.add(upload.id);
        try {
          const clip = await admitResumableUpload(
            { id: upload.id, size: upload.size!, metadata: upload.metadata as ResumableMetadata },
            uploaderOf(req),
            { paths, store, publicUrl },
          );
          return {
            status_code: HttpStatus.OK,
            headers: { 'Content-Type': 'application/json' },
            body: JSON.stringify(clip),
          };
        } finally {
          admitting.delete(upload.id);
        }
      },
      onResponseError(req, error) {
        if (error instanceof AppError) return errorAnswer(error.status, error);
        // tus's own refusals ({ status_code, body }) keep their protocol meaning (409 offset, 460 checksum, …).
        if (!(error instanceof Error)) return undefined;
        const node = expressRequestOf(req);
        const requestId = node.res?.locals.requestId as string | undefined;
        console.error(`[${requestId ?? '-'}] ${req.method} ${node.originalUrl}`, error);
        return errorAnswer(HttpStatus.INTERNAL_SERVER_ERROR, {
          code: 'internal',
          message: `Something went wrong on the server (request ${requestId ?? 'unknown'}).`,
        });
      },
    });
  // The file store makes its folder when built: built on first use, so incoming/ stays as it was until then.
  let tus: Server | null = null;

  return (req, res, next) => {
    tus ??= createServer();
    tus.handle(req, res).catch(next);
  };
}

function expressRequestOf(req: TusRequest): ExpressRequest {
  return req.runtime!.node!.req as unknown as ExpressRequest;
}

/** The signed-in uploader: the route puts requireRole in front of the engine. */
function uploaderOf(req: TusRequest): number {
  return expressRequestOf(req).user!.id;
}

function uploadGone(): AppError {
  return new AppError(
    HttpStatus.NOT_FOUND,
    'upload_not_found',
    'This upload is no longer on the server (it finished, was cancelled or expired); send the file again.',
  );
}

function errorAnswer(
  status: number,
  { code, message, details }: { code: string; message: string; details?: unknown },
): { status_code: number; body: string } {
  const body: ApiErrorBody = { error: { code, message, details } };
  return { status_code: status, body: JSON.stringify(body) };
}
