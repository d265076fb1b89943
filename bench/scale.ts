/**
 * Scale-out benchmark (not a test): the same generated footage (N copies of a 1280×720 row-pass clip) is uploaded
 * to a real server and processed at a new project's defaults by 1, 2 and 4 worker processes against PostgreSQL and
 * an S3-compatible fake (s3rver), each worker with a scratch folder of its own, beside the embedded reference: SQLite,
 * the storage folder and one worker, run first in the same script. Prints footage seconds processed per wall second
 * for each case and its ratio to the reference.
 *   npm run bench:scale [-- --clips 6 --seconds 10 --workers 1,2,4]
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import pg from 'pg';
import { renderRowPassClip } from './row-pass-clip';
import { startRunningApp, type RunningApp, type Session } from '../tests/helpers/app-processes';
import { startS3Fake, type S3Fake } from '../tests/helpers/s3-fake';

const { values } = parseArgs({
  options: {
    clips: { type: 'string', default: '6' },
    seconds: { type: 'string', default: '10' },
    workers: { type: 'string', default: '1,2,4' },
    postgres: { type: 'string', default: 'postgres://postgres@127.0.0.1:5432/test' },
  },
});
const CLIPS = Math.max(1, Number(values.clips));
const SECONDS = Math.max(2, Number(values.seconds));
const WORKER_COUNTS = values.workers.split(',').map(Number);
const POLL_MS = 500;
const work = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-bench-scale-'));

interface Case {
  label: string;
  workers: number;
  scaled: boolean;
}

interface Outcome extends Case {
  wallS: number;
  footageS: number;
}

/** The row-pass clip once, then copies that differ in one trailing byte, so the project takes each as new. */
async function footage(): Promise<string[]> {
  const original = await renderRowPassClip(work, SECONDS);
  const bytes = fs.readFileSync(original);
  return Array.from({ length: CLIPS }, (_, n) => {
    const copy = path.join(work, `row-pass-${n}.mp4`);
    fs.writeFileSync(copy, Buffer.concat([bytes, Buffer.from([n])]));
    return copy;
  });
}

async function onMaintenance(sql: string): Promise<void> {
  const client = new pg.Client({ connectionString: values.postgres });
  await client.connect();
  try {
    await client.query(sql);
  } finally {
    await client.end();
  }
}

/** A database of its own on the PostgreSQL server, dropped afterwards. */
async function freshDatabase(): Promise<{ url: string; drop(): Promise<void> }> {
  const name = `kf_bench_${randomBytes(4).toString('hex')}`;
  await onMaintenance(`CREATE DATABASE ${name}`);
  const url = new URL(values.postgres);
  url.pathname = `/${name}`;
  return { url: url.toString(), drop: () => onMaintenance(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`) };
}

function stopped(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return Promise.resolve();
  return new Promise((done) => {
    child.once('exit', () => done());
    child.kill('SIGTERM');
  });
}

/** Waits until every uploaded clip is processed; throws when one failed. */
async function processed(app: RunningApp, session: Session, clipIds: number[]): Promise<void> {
  for (;;) {
    const states = await Promise.all(
      clipIds.map(async (id) => {
        const response = await app.api(session, 'GET', `/api/clips/${id}`);
        return ((await response.json()) as { state: string; error: string | null }).state;
      }),
    );
    if (states.includes('failed')) throw new Error(`a clip failed: ${states.join(', ')}`);
    if (states.every((state) => state === 'awaiting_review')) return;
    await new Promise((done) => setTimeout(done, POLL_MS));
  }
}

async function run(one: Case, files: string[]): Promise<Outcome> {
  const storageDir = path.join(work, `${one.label.replace(/\W+/g, '-')}-${one.workers}`);
  let fake: S3Fake | null = null;
  let database: Awaited<ReturnType<typeof freshDatabase>> | null = null;
  const shared: NodeJS.ProcessEnv = {};
  if (one.scaled) {
    fake = await startS3Fake('kinefold-bench');
    database = await freshDatabase();
    Object.assign(shared, fake.env, { KINEFOLD_OBJECT_STORE: `s3://${fake.bucket}/bench` });
  }
  const before = { ...process.env };
  Object.assign(process.env, shared);
  const app = await startRunningApp(storageDir, { databaseUrl: database?.url ?? null });
  const workers: ChildProcess[] = [];
  try {
    const session = await app.signIn('admin');
    const created = await app.api(session, 'POST', '/api/projects', { name: `Scale ${one.label} ${one.workers}` });
    const project = (await created.json()) as { id: number };
    const clipIds: number[] = [];
    for (const file of files) {
      const uploaded = await app.upload(session, file, project.id);
      if (uploaded.status !== 201) throw new Error(`an upload was answered ${uploaded.status}: ${uploaded.body}`);
      clipIds.push((JSON.parse(uploaded.body) as { id: number }).id);
    }
    const start = performance.now();
    for (let n = 0; n < one.workers; n += 1) {
      const env = {
        ...process.env,
        KINEFOLD_STORAGE_DIR: storageDir,
        KINEFOLD_DATABASE_URL: database?.url ?? '',
        KINEFOLD_SCRATCH_DIR: path.join(work, `scratch-${n}`),
        KINEFOLD_DEMO: 'off',
      };
      workers.push(
        spawn(process.execPath, ['--import', 'tsx', 'worker/index.ts'], {
          env,
          stdio: ['ignore', 'ignore', 'inherit'],
        }),
      );
    }
    await processed(app, session, clipIds);
    return { ...one, wallS: (performance.now() - start) / 1000, footageS: files.length * SECONDS };
  } finally {
    await Promise.all(workers.map(stopped));
    await app.stop();
    process.env = before;
    await database?.drop();
    await fake?.close();
  }
}

const files = await footage();
console.log(
  `footage: ${CLIPS} clips × ${SECONDS} s at 1280×720; ${os.cpus().length} cores; load average ` +
    `${os.loadavg()[0]!.toFixed(2)} at the start`,
);
try {
  const cases: Case[] = [
    { label: 'SQLite + folder', workers: 1, scaled: false },
    ...WORKER_COUNTS.map((workers) => ({ label: 'PostgreSQL + S3 fake', workers, scaled: true })),
  ];
  const outcomes: Outcome[] = [];
  for (const one of cases) {
    const outcome = await run(one, files);
    outcomes.push(outcome);
    const rate = outcome.footageS / outcome.wallS;
    console.log(
      `${outcome.label}, ${outcome.workers} worker${outcome.workers === 1 ? '' : 's'}: ${outcome.footageS} s of ` +
        `footage in ${outcome.wallS.toFixed(1)} s → ${rate.toFixed(2)} footage s per wall s ` +
        `(${(rate / (outcomes[0]!.footageS / outcomes[0]!.wallS)).toFixed(2)}× the reference); ` +
        `load average ${os.loadavg()[0]!.toFixed(2)}`,
    );
  }
} finally {
  fs.rmSync(work, { recursive: true, force: true });
}
