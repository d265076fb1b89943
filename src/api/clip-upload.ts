import { Upload, type DetailedError } from 'tus-js-client';
import type { ApiErrorBody } from '../../shared/api-types';
import { HttpStatus } from '../../shared/http-status';
import type { ClipSummary } from '../../shared/types/clips';
import { ApiError, apiErrorFrom, fetchCsrfToken } from './http';

/** The server's resumable (tus) uploads; the multipart `POST /api/clips` stays for scripts. */
const RESUMABLE_ENDPOINT = '/api/clips/resumable';

/**
 * Waits between attempts after a broken connection: quick at first, then every 15 s for about ten minutes, so a
 * phone that changes network or loses signal for a while carries on where it stopped.
 */
const RETRY_DELAYS_MS = [0, 1000, 3000, 5000, 10_000, ...Array<number>(40).fill(15_000)];

export interface UploadHandle {
  done: Promise<ClipSummary>;
  cancel(): void;
}

export interface UploadProgress {
  /** Bytes the server holds or is being sent, of the file's size. */
  onProgress(sentBytes: number, totalBytes: number): void;
  /** The connection broke; the upload will carry on from the server's offset. */
  onInterrupted?(): void;
}

/**
 * Sends one file as a resumable upload (tus): the capture metadata travels as Upload-Metadata and the server
 * reserves quota before the first byte; a broken connection resumes from what the server holds, and so does the
 * same file chosen again with the same metadata after a reload (the browser keeps the upload's address).
 * The final answer is the new clip, or the same refusals as the multipart route.
 */
export function uploadClip(fields: Record<string, string>, file: File, progress: UploadProgress): UploadHandle {
  let upload: Upload | null = null;
  let cancelled = false;
  let stop: ((error: Error) => void) | null = null;
  const done = fetchCsrfToken().then(
    (token) =>
      new Promise<ClipSummary>((resolve, reject) => {
        stop = reject;
        const sending = new Upload(file, {
          endpoint: RESUMABLE_ENDPOINT,
          metadata: { ...fields, filename: file.name },
          headers: { 'x-csrf-token': token },
          retryDelays: RETRY_DELAYS_MS,
          fingerprint: () => Promise.resolve(fingerprintOf(file, fields)),
          removeFingerprintOnSuccess: true,
          onProgress: progress.onProgress,
          onShouldRetry: (error) => {
            const retry = shouldRetry(error);
            if (retry) progress.onInterrupted?.();
            return retry;
          },
          onSuccess: ({ lastResponse }) => {
            const clip = parseJson<ClipSummary>(lastResponse.getBody());
            if (clip?.id) resolve(clip);
            else reject(new Error('The server has the whole file but its answer was lost; look for it under Clips.'));
          },
          onError: (error) => reject(refusalOf(error)),
        });
        upload = sending;
        void sending.findPreviousUploads().then((previous) => {
          if (cancelled) return;
          if (previous[0]) sending.resumeFromPreviousUpload(previous[0]);
          sending.start();
        }, reject);
      }),
  );
  return {
    done,
    cancel() {
      cancelled = true;
      // Terminating (DELETE) removes the partial file on the server and gives its reserved quota back.
      void upload?.abort(true).catch(() => undefined);
      stop?.(new DOMException('Upload cancelled', 'AbortError'));
    },
  };
}

/** One upload per file, project and metadata: the same file sent with other fields starts a new upload. */
function fingerprintOf(file: File, fields: Record<string, string>): string {
  return ['kinefold', file.name, file.type, file.size, file.lastModified, JSON.stringify(fields)].join('|');
}

/**
 * Kinefold's refusals (JSON `{ error }`: quota, duplicate, probe, …) are final; a broken connection, a busy
 * upload (423), tus's offset conflict (409) and server trouble without an answer of ours are tried again.
 */
function shouldRetry(error: DetailedError): boolean {
  const response = error.originalResponse;
  if (!response) return true;
  const status = response.getStatus();
  if (status === HttpStatus.LOCKED) return true;
  if (parseJson<ApiErrorBody>(response.getBody())?.error) return false;
  return status >= HttpStatus.INTERNAL_SERVER_ERROR || status === HttpStatus.CONFLICT;
}

function refusalOf(error: Error | DetailedError): Error {
  const response = 'originalResponse' in error ? error.originalResponse : null;
  if (!response) return new Error('The connection to the server broke off and did not come back; try again.');
  const text = response.getBody();
  const body = parseJson<ApiErrorBody>(text);
  if (body?.error) return apiErrorFrom(response.getStatus(), '', body);
  return new ApiError(
    response.getStatus(),
    'http_error',
    `The server answered ${response.getStatus()}: ${text.trim()}`,
  );
}

function parseJson<T>(text: string): T | null {
  try {
    return JSON.parse(text) as T;
  } catch {
    return null;
  }
}
