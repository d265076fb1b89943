import { createHash } from 'node:crypto';
import fs from 'node:fs';
import { HttpStatus } from '../../../shared/http-status';
import { uploadFieldsSchema, type UploadFields } from '../../../shared/schemas/clips';
import type { ClipSummary } from '../../../shared/types/clips';
import { AppError, invalidInput } from '../errors';
import { UploadReservation } from '../models';
import type { ObjectStore } from '../storage/object-store';
import type { StoragePaths } from '../storage/paths';
import { reserveUpload } from '../usage/quotas';
import { admitUpload } from './clip-admission';
import { discardUpload } from './received-upload';

/** The tus Upload-Metadata key that carries the file's name; every other key is a capture metadata field. */
export const FILE_NAME_KEY = 'filename';

/** What a resumable upload declares when it is created, as tus Upload-Metadata (values may be null). */
export type ResumableMetadata = Record<string, string | null> | undefined;

/** The capture metadata and file name of a resumable upload, checked as the multipart fields are. */
export function readResumableMetadata(metadata: ResumableMetadata): { fields: UploadFields; fileName?: string } {
  const { [FILE_NAME_KEY]: fileName, ...rest } = metadata ?? {};
  const sent = Object.fromEntries(Object.entries(rest).filter(([, value]) => value !== null));
  if (sent.projectId === undefined) {
    throw new AppError(
      HttpStatus.BAD_REQUEST,
      'invalid_input',
      'projectId: send the projectId and the metadata fields in Upload-Metadata.',
      { field: 'projectId' },
    );
  }
  const result = uploadFieldsSchema.safeParse(sent);
  if (!result.success) throw invalidInput('metadata', result.error);
  return { fields: result.data, fileName: fileName ?? undefined };
}

/**
 * Starts a resumable upload: its metadata is checked and its whole declared length reserved against the quotas
 * before a byte arrives, under the upload's own id, with the same refusals as a multipart upload.
 */
export async function openResumableUpload(
  uploadId: string,
  metadata: ResumableMetadata,
  uploaderId: number,
  bytes: number,
): Promise<void> {
  const { fields } = readResumableMetadata(metadata);
  await reserveUpload(fields.projectId, uploaderId, bytes, uploadId);
}

/** Who began a resumable upload still in flight; null once it finished, was cancelled or expired. */
export async function resumableUploader(uploadId: string): Promise<number | null> {
  const reservation = await UploadReservation.findByPk(uploadId);
  return reservation ? reservation.userId : null;
}

/**
 * Turns a complete resumable upload into a clip through the same admission as a multipart upload (empty,
 * duplicate and unprobeable files refused). Whatever the outcome, nothing of the upload stays in `incoming/`.
 */
export async function admitResumableUpload(
  upload: { id: string; size: number; metadata: ResumableMetadata },
  uploaderId: number,
  context: { paths: StoragePaths; store: ObjectStore; publicUrl: string },
): Promise<ClipSummary> {
  const path = context.paths.resumableFile(upload.id);
  try {
    const { fields, fileName } = readResumableMetadata(upload.metadata);
    const sha256 = await hashFile(path);
    const received = { path, size: upload.size, sha256, reservationId: upload.id, fields };
    return await admitUpload(received, fileName, uploaderId, context);
  } catch (error) {
    // admitUpload discards on its own refusals; this covers a failure before it (discarding twice is safe).
    await discardUpload({ path, reservationId: upload.id });
    throw error;
  } finally {
    await fs.promises.rm(context.paths.resumableInfo(upload.id), { force: true });
  }
}

/**
 * A resumable upload arrives over many requests, possibly across restarts, so its hash is taken once the last
 * byte is on disk rather than while streaming.
 */
async function hashFile(path: string): Promise<string> {
  const hash = createHash('sha256');
  for await (const chunk of fs.createReadStream(path)) hash.update(chunk as Buffer);
  return hash.digest('hex');
}
