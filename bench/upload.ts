/**
 * Upload benchmark (not a test): streams one large clip to a running Kinefold server and reports the server's
 * RSS growth (goal < 64 MiB) and its throughput next to a plain stream copy of the same file on the same disk,
 * measured in the same run.   npm run bench:upload [-- --mb 1024]
 */
import { execFile, spawn } from 'node:child_process';
import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import { pipeline } from 'node:stream/promises';
import { parseArgs } from 'node:util';
import { promisify } from 'node:util';
import ffmpegInstaller from '@ffmpeg-installer/ffmpeg';
import { DEMO_ACCOUNTS } from '../server/services/demo-accounts';

const { values } = parseArgs({ options: { mb: { type: 'string', default: '1024' } } });
const sizeBytes = Number(values.mb) * 1024 * 1024;
const work = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-bench-upload-'));
const port = 3400 + Math.floor(Math.random() * 500);
const baseUrl = `http://127.0.0.1:${port}`;

/** A real clip padded with zeros to the wanted size: ffprobe and the first-frame decode accept it like footage. */
async function makeLargeClip(): Promise<string> {
  const file = path.join(work, 'large-pass.mkv');
  await promisify(execFile)(ffmpegInstaller.path, ['-v', 'error', '-f', 'lavfi', '-i',
    'testsrc2=size=640x360:rate=25:duration=10', '-c:v', 'libx264', '-preset', 'ultrafast', file]);
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

async function json(response: Response) {
  return (await response.json()) as Record<string, unknown>;
}

async function signIn(): Promise<{ cookie: string; csrf: string }> {
  const admin = DEMO_ACCOUNTS.find((account) => account.role === 'admin')!;
  // A later Set-Cookie replaces an earlier one of the same name (the CSRF cookie changes after sign-in).
  const cookieOf = (response: Response, old = '') => {
    const jar = new Map(old.split('; ').filter(Boolean).map((pair) => [pair.split('=')[0]!, pair]));
    for (const cookie of response.headers.getSetCookie()) jar.set(cookie.split('=')[0]!, cookie.split(';')[0]!);
    return [...jar.values()].join('; ');
  };
  const first = await fetch(`${baseUrl}/api/auth/csrf`);
  let cookie = cookieOf(first);
  const signedIn = await fetch(`${baseUrl}/api/auth/sign-in`, {
    method: 'POST', body: JSON.stringify({ email: admin.email, password: admin.password }),
    headers: { cookie, 'content-type': 'application/json', 'x-csrf-token': String((await json(first)).token) },
  });
  cookie = cookieOf(signedIn, cookie);
  const second = await fetch(`${baseUrl}/api/auth/csrf`, { headers: { cookie } });
  return { cookie: cookieOf(second, cookie), csrf: String((await json(second)).token) };
}

async function upload(file: string, projectId: number, session: { cookie: string; csrf: string }): Promise<number> {
  const boundary = '----kinefoldbench';
  const head = Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="projectId"\r\n\r\n${projectId}\r\n`
    + `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="large-pass.mkv"\r\n\r\n`);
  const tail = Buffer.from(`\r\n--${boundary}--\r\n`);
  const length = head.length + fs.statSync(file).size + tail.length;
  return new Promise((resolve, reject) => {
    const request = http.request(`${baseUrl}/api/clips`, {
      method: 'POST',
      headers: {
        cookie: session.cookie, 'x-csrf-token': session.csrf, 'content-length': length,
        'content-type': `multipart/form-data; boundary=${boundary}`,
      },
    }, (response) => {
      response.resume();
      response.on('end', () => resolve(response.statusCode ?? 0));
    });
    request.on('error', reject);
    request.write(head);
    const stream = fs.createReadStream(file);
    stream.pipe(request, { end: false });
    stream.on('end', () => request.end(tail));
  });
}

const file = await makeLargeClip();
const copyStart = performance.now();
await pipeline(fs.createReadStream(file), fs.createWriteStream(path.join(work, 'plain-copy.mkv')));
const copyS = (performance.now() - copyStart) / 1000;
fs.rmSync(path.join(work, 'plain-copy.mkv'));

const serverEnv = { ...process.env, PORT: String(port), KINEFOLD_STORAGE_DIR: path.join(work, 'storage'), KINEFOLD_DEMO: 'accounts' };
await promisify(execFile)(process.execPath, ['--import', 'tsx', 'server/cli/prepare.ts'], { env: serverEnv });
const server = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], { env: serverEnv, stdio: 'ignore' });
try {
  for (let i = 0; i < 100; i += 1) {
    if (await fetch(`${baseUrl}/api/health`).then((r) => r.ok, () => false)) break;
    await new Promise((done) => setTimeout(done, 200));
  }
  const session = await signIn();
  const project = await fetch(`${baseUrl}/api/projects`, {
    method: 'POST', body: JSON.stringify({ name: 'Upload benchmark' }),
    headers: { cookie: session.cookie, 'x-csrf-token': session.csrf, 'content-type': 'application/json' },
  });
  const projectId = Number((await json(project)).id);
  const rssBefore = rssBytes(server.pid!);
  let rssPeak = rssBefore;
  const sampler = setInterval(() => { rssPeak = Math.max(rssPeak, rssBytes(server.pid!)); }, 50);
  const uploadStart = performance.now();
  const status = await upload(file, projectId, session);
  const uploadS = (performance.now() - uploadStart) / 1000;
  clearInterval(sampler);
  if (status !== 201) throw new Error(`the upload was answered ${status}, not 201`);
  const mib = sizeBytes / 1024 ** 2;
  console.log(`file: ${mib.toFixed(0)} MiB; upload answered ${status}`);
  console.log(`plain stream copy: ${copyS.toFixed(2)} s (${(mib / copyS).toFixed(0)} MiB/s)`);
  console.log(`upload to Kinefold: ${uploadS.toFixed(2)} s (${(mib / uploadS).toFixed(0)} MiB/s), `
    + `${(copyS / uploadS).toFixed(2)}× the plain copy's throughput (includes SHA-256, probe and first-frame decode)`);
  console.log(`server RSS: ${(rssBefore / 1024 ** 2).toFixed(0)} MiB before, peak ${(rssPeak / 1024 ** 2).toFixed(0)} MiB, `
    + `growth ${((rssPeak - rssBefore) / 1024 ** 2).toFixed(1)} MiB (goal < 64 MiB)`);
} finally {
  server.kill('SIGTERM');
  fs.rmSync(work, { recursive: true, force: true });
}
