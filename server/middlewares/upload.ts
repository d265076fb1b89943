import type { NextFunction, Request, Response } from 'express';
import multer from 'multer';
import { formatBytes } from '../../shared/format-bytes';
import { HttpStatus } from '../../shared/http-status';
import { AppError } from '../core/errors';
import type { StoragePaths } from '../core/storage/paths';
import { UploadEngine } from './upload-engine';

/** Room for the multipart envelope and the metadata fields around the file. */
const MULTIPART_ALLOWANCE_BYTES = 1024 * 1024;

/**
 * Receives one clip file per request, streamed to disk by UploadEngine. The declared size is checked before a
 * byte is read; multer's own limits cut a body that lies about it.
 */
export function receiveClipUpload(paths: StoragePaths, limitBytes: number) {
  const receive = multer({
    storage: new UploadEngine(paths),
    defParamCharset: 'utf8',
    limits: { fileSize: limitBytes, files: 1, fields: 10, fieldSize: 64 * 1024, parts: 12 },
  }).single('file');

  return (req: Request, res: Response, next: NextFunction) => {
    const declared = Number(req.headers['content-length']);
    if (!req.headers['content-length'] || !Number.isFinite(declared)) {
      throw new AppError(
        HttpStatus.LENGTH_REQUIRED,
        'length_required',
        'Uploads must declare their size (Content-Length) so quotas can be checked first.',
      );
    }
    if (declared > limitBytes + MULTIPART_ALLOWANCE_BYTES) throw tooLarge(limitBytes, declared);
    receive(req, res, (error?: unknown) => {
      if (error instanceof multer.MulterError) return next(fromMulterError(error, limitBytes));
      if (error) return next(error);
      if (!req.file?.received) {
        return next(
          new AppError(HttpStatus.BAD_REQUEST, 'invalid_input', 'file: the request has no file field.', {
            field: 'file',
          }),
        );
      }
      next();
    });
  };
}

/** The refusal of a file over the upload limit, for the multipart and the resumable route alike. */
export function tooLarge(limitBytes: number, bytes?: number): AppError {
  return new AppError(
    HttpStatus.PAYLOAD_TOO_LARGE,
    'file_too_large',
    `${bytes ? `This upload is ${formatBytes(bytes)}; ` : ''}files up to ${formatBytes(limitBytes)} are accepted.`,
  );
}

function fromMulterError(error: multer.MulterError, limitBytes: number): AppError {
  if (error.code === 'LIMIT_FILE_SIZE') return tooLarge(limitBytes);
  return new AppError(HttpStatus.BAD_REQUEST, 'invalid_upload', `The upload is malformed: ${error.message}.`, {
    field: error.field,
  });
}
