import { createHash, randomUUID } from 'node:crypto';
import fs from 'node:fs';
import { Transform } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import type { Request } from 'express';
import type { StorageEngine } from 'multer';
import { HttpStatus } from '../../shared/http-status';
import { uploadFieldsSchema, type UploadFields } from '../../shared/schemas/clips';
import { AppError, invalidInput } from '../core/errors';
import { currentUser } from './auth';
import type { StoragePaths } from '../core/storage/paths';
import { discardUpload, type ReceivedUpload } from '../core/clips/received-upload';
import { reserveUpload } from '../core/usage/quotas';

declare global {
  namespace Express {
    namespace Multer {
      interface File {
        /** Set by UploadEngine once the whole file is on disk. */
        received?: ReceivedUpload;
      }
    }
  }
}

/**
 * A multer storage engine that streams one file into `<storage>/incoming` while hashing it. Before reading a
 * byte it validates the metadata fields (sent before the file) and reserves the request's Content-Length against
 * the quotas; any failure removes the partial file and releases the reservation.
 */
export class UploadEngine implements StorageEngine {
  constructor(private readonly paths: StoragePaths) {}

  _handleFile(
    req: Request,
    file: Express.Multer.File,
    callback: (error?: unknown, info?: Partial<Express.Multer.File>) => void,
  ): void {
    this.receive(req, file).then(
      (received) => callback(null, { path: received.path, size: received.size, received }),
      callback,
    );
  }

  _removeFile(_req: Request, file: Express.Multer.File, callback: (error: Error | null) => void): void {
    discardUpload(file.received ?? { path: file.path }).then(() => callback(null), callback);
  }

  private async receive(req: Request, file: Express.Multer.File): Promise<ReceivedUpload> {
    const fields = parseFields(req.body);
    const reservationId = await reserveUpload(
      fields.projectId,
      currentUser(req).id,
      Number(req.headers['content-length']),
    );
    const path = this.paths.incomingFile(randomUUID());
    const hash = createHash('sha256');
    let size = 0;
    const measure = new Transform({
      transform(chunk: Buffer, _encoding, done) {
        hash.update(chunk);
        size += chunk.length;
        done(null, chunk);
      },
    });
    try {
      await fs.promises.mkdir(this.paths.incomingDir, { recursive: true });
      await pipeline(file.stream, measure, fs.createWriteStream(path, { flags: 'wx' }));
    } catch (error) {
      await discardUpload({ path, reservationId });
      throw error;
    }
    return { path, size, sha256: hash.digest('hex'), reservationId, fields };
  }
}

function parseFields(body: unknown): UploadFields {
  const raw = (body ?? {}) as Record<string, unknown>;
  if (raw.projectId === undefined) {
    throw new AppError(
      HttpStatus.BAD_REQUEST,
      'invalid_input',
      'projectId: send the projectId and metadata fields before the file field.',
      { field: 'projectId' },
    );
  }
  const result = uploadFieldsSchema.safeParse(raw);
  if (!result.success) throw invalidInput('body', result.error);
  return result.data;
}
