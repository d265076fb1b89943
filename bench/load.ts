/**
 * Load benchmark (not a test): a real server and worker on a database of 100,000 seeded clips (seeded by
 * bench/review-queue.ts into the same storage folder), hit by autocannon with 50 keep-alive connections over four
 * signed-in sessions. Reported side by side in the same run:
 *   - GET /api/health, the floor of any request (no session, one trivial statement);
 *   - the review queue and clip list pages with the worker idle, then while it processes clips;
 *   - 24 concurrent 50 MB uploads from the four sessions: errors and the server's RSS growth.
 * Goals: lists ≥ 300 requests/s with p95 ≤ 250 ms; uploads with 0 errors and RSS growth < 128 MB.
 *   npm run bench:load [-- --storage DIR] [--seconds 10] [--connections 50] [--uploads 24] [--mb 50]
 * With --storage the seeded database is kept in DIR and reused (seeding takes a minute or two). Every run serves a
 * fresh copy of it, so one run's uploads and unfinished jobs never reach the next run's "worker idle" figures.
 */
import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs, promisify } from 'node:util';
import autocannon from 'autocannon';
import type { Role } from '../shared/roles';
import { startRunningApp, type RunningApp, type Session } from '../tests/helpers/app-processes';
import { makeTestClip } from '../tests/helpers/media-fixtures';
import { makePatternClip } from '../tests/helpers/pipeline-clips';
import { paddedCopy } from '../tests/helpers/upload-over-http';

const { values } = parseArgs({
  options: {
    storage: { type: 'string' },
    seconds: { type: 'string', default: '10' },
    connections: { type: 'string', default: '50' },
    uploads: { type: 'string', default: '24' },
    mb: { type: 'string', default: '50' },
  },
});
const SECONDS = Number(values.seconds);
const CONNECTIONS = Number(values.connections);
const UPLOADS = Number(values.uploads);
const UPLOAD_MB = Number(values.mb);
const ROLES: Role[] = ['curator', 'operator', 'engineer', 'admin'];
/** Clips the worker is given for the "worker busy" run: long enough to keep it busy through the measurement. */
const BUSY_CLIPS = 4;
const BUSY_CLIP_S = 60;
const SETTLE_LIMIT_MS = 300_000;

const work = values.storage ? path.resolve(values.storage) : fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-load-'));
const run = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-load-run-'));
const storageDir = path.join(run, 'storage');
const media = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-load-media-'));

/** The review-queue benchmark seeds 100,000 clips into <work>/storage when it finds none; one short run of it. */
async function seed(): Promise<void> {
  console.log(`seeding (or reusing) 100,000 clips in ${work} …`);
  await promisify(execFile)(
    process.execPath,
    ['--import', 'tsx', 'bench/review-queue.ts', '--storage', work, '--runs', '1'],
    { maxBuffer: 16 * 1024 * 1024 },
  );
}

/** The seeded clips have no files: their database is all a run needs, copied while no process has it open. */
function copySeed(): void {
  fs.cpSync(path.join(work, 'storage', 'db'), path.join(storageDir, 'db'), { recursive: true });
}

/**
 * Waits until the worker holds and awaits no job: at start it runs its daily pass over the 100,000 clips, which
 * is not what "worker idle" means.
 */
async function workerSettled(app: RunningApp, admin: Session): Promise<number> {
  const begin = performance.now();
  for (;;) {
    const totals = await Promise.all(
      ['running', 'queued'].map(async (state) => {
        const answer = await app.api(admin, 'GET', `/api/jobs?state=${state}`);
        return ((await answer.json()) as { total: number }).total;
      }),
    );
    if (totals.every((total) => total === 0)) return (performance.now() - begin) / 1000;
    if (performance.now() - begin > SETTLE_LIMIT_MS) throw new Error(`the worker still has jobs: ${totals.join(', ')}`);
    await new Promise((done) => setTimeout(done, 500));
  }
}

interface Row {
  name: string;
  rps: number;
  p50: number;
  p95: number;
  p99: number;
  errors: number;
}

function quantile(sorted: number[], q: number): number {
  return sorted[Math.min(sorted.length - 1, Math.ceil(q * sorted.length) - 1)] ?? 0;
}

/**
 * One autocannon run. autocannon's own summary has no p95, so every response's latency is kept from its
 * 'response' event and the quantiles are read from the sorted list.
 */
async function load(name: string, requests: autocannon.Request[], baseUrl: string): Promise<Row> {
  const times: number[] = [];
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon(
      { url: baseUrl, connections: CONNECTIONS, duration: SECONDS, requests },
      (error, done) => (error ? reject(error) : resolve(done)),
    );
    instance.on('response', (_client, _status, _bytes, ms) => times.push(ms));
  });
  times.sort((a, b) => a - b);
  return {
    name,
    rps: result.requests.average,
    p50: quantile(times, 0.5),
    p95: quantile(times, 0.95),
    p99: quantile(times, 0.99),
    errors: result.errors + result.timeouts + result.non2xx,
  };
}

/** Each connection walks the four sessions in turn, alternating the queue page and the clip list page. */
function listRequests(sessions: Session[]): autocannon.Request[] {
  const reviewers = [sessions[ROLES.indexOf('curator')]!, sessions[ROLES.indexOf('admin')]!];
  return sessions.flatMap((session, index) => [
    { method: 'GET' as const, path: '/api/review/queue', headers: { cookie: reviewers[index % 2]!.cookie } },
    { method: 'GET' as const, path: `/api/clips?page=${1 + index}`, headers: { cookie: session.cookie } },
  ]);
}

function rssMb(pid: number): number {
  const status = fs.readFileSync(`/proc/${pid}/status`, 'utf8');
  return Number(/VmRSS:\s+(\d+)/.exec(status)![1]) / 1024;
}

async function uploads(app: RunningApp, sessions: Session[]): Promise<string> {
  const admin = sessions[ROLES.indexOf('admin')]!;
  const created = await app.api(admin, 'POST', '/api/projects', { name: `Load week ${Date.now()}` });
  const projectId = ((await created.json()) as { id: number }).id;
  const base = await makeTestClip(media, 'base.mp4', { seconds: 1 });
  const files = Array.from({ length: UPLOADS }, (_, index) =>
    paddedCopy(base, path.join(media, `load-${index}.mp4`), UPLOAD_MB * 1024 * 1024, index),
  );
  // Operators and admins may upload; the four sessions' uploads go as the operator and the admin.
  const uploaders = [sessions[ROLES.indexOf('operator')]!, admin];
  const pid = app.server.pid!;
  const before = rssMb(pid);
  let peak = before;
  const sampler = setInterval(() => {
    peak = Math.max(peak, rssMb(pid));
  }, 100);
  const begin = performance.now();
  const answers = await Promise.all(files.map((file, index) => app.upload(uploaders[index % 2]!, file, projectId)));
  const seconds = (performance.now() - begin) / 1000;
  clearInterval(sampler);
  const errors = answers.filter((answer) => answer.status !== 201);
  for (const error of errors.slice(0, 3)) console.log(`  upload answered ${error.status}: ${error.body.slice(0, 200)}`);
  return (
    `| ${UPLOADS} concurrent ${UPLOAD_MB} MB uploads | ${seconds.toFixed(1)} s in all | ` +
    `${((UPLOADS * UPLOAD_MB) / seconds).toFixed(0)} MB/s | errors ${errors.length} | ` +
    `server RSS ${before.toFixed(0)} → peak ${peak.toFixed(0)} MB (growth ${(peak - before).toFixed(0)} MB) |`
  );
}

await seed();
copySeed();
const app = await startRunningApp(storageDir, { worker: true });
try {
  const sessions: Session[] = [];
  for (const role of ROLES) sessions.push(await app.signIn(role));
  console.log(`worker settled after ${(await workerSettled(app, sessions[ROLES.indexOf('admin')]!)).toFixed(1)} s`);
  const health = await load('GET /api/health (floor)', [{ method: 'GET', path: '/api/health' }], app.baseUrl);
  const idle = await load('queue + clip list, worker idle', listRequests(sessions), app.baseUrl);

  const busySources = await Promise.all(
    Array.from({ length: BUSY_CLIPS }, (_, index) =>
      makePatternClip(path.join(media, `busy-${index}.mp4`), BUSY_CLIP_S, `hue=h=${index * 40}`),
    ),
  );
  const admin = sessions[ROLES.indexOf('admin')]!;
  const project = await app.api(admin, 'POST', '/api/projects', { name: `Busy worker ${Date.now()}` });
  const busyProject = ((await project.json()) as { id: number }).id;
  for (const file of busySources) await app.upload(admin, file, busyProject);
  const busy = await load('queue + clip list, worker busy', listRequests(sessions), app.baseUrl);

  console.log(
    `\n${CONNECTIONS} connections, ${SECONDS} s each, ${os.cpus().length} cores, load average before: ` +
      `${os
        .loadavg()
        .map((value) => value.toFixed(1))
        .join(' ')}\n`,
  );
  console.log('| run | requests/s | p50 | p95 | p99 | errors | requests/s vs. floor |');
  console.log('|---|---|---|---|---|---|---|');
  for (const row of [health, idle, busy]) {
    console.log(
      `| ${row.name} | ${row.rps.toFixed(0)} | ${row.p50.toFixed(0)} ms | ${row.p95.toFixed(0)} ms ` +
        `| ${row.p99.toFixed(0)} ms ` +
        `| ${row.errors} | ${(row.rps / health.rps).toFixed(2)} |`,
    );
  }
  console.log(`\n${await uploads(app, sessions)}`);
} finally {
  const stopping = performance.now();
  await app.stop();
  console.log(`server and worker stopped ${((performance.now() - stopping) / 1000).toFixed(1)} s after SIGTERM`);
  fs.rmSync(run, { recursive: true, force: true });
  fs.rmSync(media, { recursive: true, force: true });
  if (!values.storage) fs.rmSync(work, { recursive: true, force: true });
}
