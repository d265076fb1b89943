import fs from 'node:fs';
import type { UploadFields } from '../../../shared/schemas/clips';
import { releaseUpload } from '../usage/quotas';

/** A fully received upload: the file in `incoming/`, its size and hash, its quota reservation and its metadata. */
export interface ReceivedUpload {
  path: string;
  size: number;
  sha256: string;
  reservationId: string;
  fields: UploadFields;
}

/** Removes an upload's partial or refused file and gives back its reserved bytes; safe to call twice. */
export async function discardUpload(upload: { path?: string; reservationId?: string }): Promise<void> {
  if (upload.path) await fs.promises.rm(upload.path, { force: true });
  if (upload.reservationId) await releaseUpload(upload.reservationId);
}
