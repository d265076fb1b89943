/**
 * Upload benchmark (not a test): streams one large clip to a running Kinefold server and reports the server's
 * RSS growth (goal < 64 MiB) and its throughput next to a plain stream copy of the same file on the same disk,
 * measured in the same run.   npm run bench:upload [-- --mb 1024]
 */
import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pipeline } from 'node:stream/promises';
import { parseArgs, promisify } from 'node:util';
import ffmpegInstaller from '@ffmpeg-installer/ffmpeg';
import { startRunningApp } from '../tests/helpers/app-processes';

const { values } = parseArgs({ options: { mb: { type: 'string', default: '1024' } } });
const sizeBytes = Number(values.mb) * 1024 * 1024;
const work = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-bench-upload-'));

/** A real clip padded with zeros to the wanted size: ffprobe and the first-frame decode accept it like footage. */
async function makeLargeClip(): Promise<string> {
  const file = path.join(work, 'large-pass.mkv');
  await promisify(execFile)(ffmpegInstaller.path, [
    '-v',
    'error',
    '-f',
    'lavfi',
    '-i',
    'testsrc2=size=640x360:rate=25:duration=10',
    '-c:v',
    'libx264',
    '-preset',
    'ultrafast',
    file,
  ]);
  const handle = await fs.promises.open(file, 'r+');
  const chunk = Buffer.alloc(8 * 1024 * 1024);
  for (let size = (await handle.stat()).size; size < sizeBytes; size += chunk.length) {
    await handle.write(chunk, 0, Math.min(chunk.length, sizeBytes - size), size);
  }
  await handle.close();
  return file;
}

function rssBytes(pid: number): number {
  const status = fs.readFileSync(`/proc/${pid}/status`, 'utf8');
  return Number(/VmRSS:\s+(\d+) kB/.exec(status)?.[1] ?? 0) * 1024;
}

const file = await makeLargeClip();
const copyStart = performance.now();
await pipeline(fs.createReadStream(file), fs.createWriteStream(path.join(work, 'plain-copy.mkv')));
const copyS = (performance.now() - copyStart) / 1000;
fs.rmSync(path.join(work, 'plain-copy.mkv'));

const app = await startRunningApp(path.join(work, 'storage'));
const server = app.server;
try {
  const session = await app.signIn('admin');
  const project = await app.api(session, 'POST', '/api/projects', { name: 'Upload benchmark' });
  const projectId = Number(((await project.json()) as { id: number }).id);
  const rssBefore = rssBytes(server.pid!);
  let rssPeak = rssBefore;
  const sampler = setInterval(() => {
    rssPeak = Math.max(rssPeak, rssBytes(server.pid!));
  }, 50);
  const uploadStart = performance.now();
  const { status } = await app.upload(session, file, projectId);
  const uploadS = (performance.now() - uploadStart) / 1000;
  clearInterval(sampler);
  if (status !== 201) throw new Error(`the upload was answered ${status}, not 201`);
  const mib = sizeBytes / 1024 ** 2;
  console.log(`file: ${mib.toFixed(0)} MiB; upload answered ${status}`);
  console.log(`plain stream copy: ${copyS.toFixed(2)} s (${(mib / copyS).toFixed(0)} MiB/s)`);
  console.log(
    `upload to Kinefold: ${uploadS.toFixed(2)} s (${(mib / uploadS).toFixed(0)} MiB/s), ` +
      `${(copyS / uploadS).toFixed(2)}× the plain copy's throughput (includes SHA-256, probe and first-frame decode)`,
  );
  console.log(
    `server RSS: ${(rssBefore / 1024 ** 2).toFixed(0)} MiB before, peak ${(rssPeak / 1024 ** 2).toFixed(0)} MiB, ` +
      `growth ${((rssPeak - rssBefore) / 1024 ** 2).toFixed(1)} MiB (goal < 64 MiB)`,
  );
} finally {
  await app.stop();
  fs.rmSync(work, { recursive: true, force: true });
}
