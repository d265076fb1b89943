import fs from 'node:fs';
import path from 'node:path';

/**
 * A copy of an MP4 made different by a trailing `free` box (ISO/IEC 14496-12 §8.1.2: free space a reader skips),
 * so one rendered clip yields many files with different SHA-256s that all probe and decode the same.
 */
export function paddedCopy(source: string, target: string, padBytes: number, fill: number): string {
  const box = Buffer.alloc(8 + padBytes, fill);
  box.writeUInt32BE(box.length, 0);
  box.write('free', 4, 'latin1');
  fs.writeFileSync(target, Buffer.concat([fs.readFileSync(source), box]));
  return target;
}

/** One multipart upload body: projectId first (the server reads the fields before the file), then the file. */
export function uploadBody(projectId: number, file: string): { body: Uint8Array<ArrayBuffer>; type: string } {
  const boundary = `----kinefold${Math.random().toString(16).slice(2)}`;
  const head =
    `--${boundary}\r\nContent-Disposition: form-data; name="projectId"\r\n\r\n${projectId}\r\n` +
    `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${path.basename(file)}"\r\n` +
    'Content-Type: video/mp4\r\n\r\n';
  const body = Buffer.concat([Buffer.from(head), fs.readFileSync(file), Buffer.from(`\r\n--${boundary}--\r\n`)]);
  return { body: new Uint8Array(body), type: `multipart/form-data; boundary=${boundary}` };
}

/** Posts one file as a signed-in browser would. */
export function postUpload(
  baseUrl: string,
  session: { cookie: string; csrf: string },
  projectId: number,
  file: string,
): Promise<Response> {
  const { body, type } = uploadBody(projectId, file);
  return fetch(`${baseUrl}/api/clips`, {
    method: 'POST',
    body,
    headers: { cookie: session.cookie, 'x-csrf-token': session.csrf, 'content-type': type },
  });
}
