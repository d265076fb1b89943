/**
 * Review-queue benchmark (not a test): seeds 100,000 clips with signals and flags into a fresh database, starts a
 * real server on it, and times `GET /api/review/queue` for typical filters and sorts next to the same page and
 * count statements run straight on the database, in the same run. Goal: p95 of the API < 50 ms.
 *   npm run bench:review [-- --clips 100000 --runs 60] [--storage DIR]
 * With --storage the seeded database is kept in DIR and reused by later runs (seeding takes a minute or two).
 */
import { execFile, spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs, promisify } from 'node:util';
import { QueryTypes, type Sequelize } from 'sequelize';
import { loadConfig } from '../server/core/config';
import { openKinefoldDatabase } from '../server/core/db/open';
import { Project, User } from '../server/core/models';
import { DEMO_ACCOUNTS } from '../server/core/people/demo-accounts';
import { queueSql } from '../server/core/review/review-queue';
import { FLAG_NAMES, type FlagName } from '../shared/flag-thresholds';
import { mulberry32 } from '../shared/pairing/seeded-random';
import { reviewQueueQuerySchema } from '../shared/schemas/review';

const { values } = parseArgs({
  options: {
    clips: { type: 'string', default: '100000' },
    runs: { type: 'string', default: '60' },
    storage: { type: 'string' },
  },
});
const CLIPS = Number(values.clips);
const RUNS = Number(values.runs);
const WARM_UP = 5;
const BATCH = 500;
const work = values.storage
  ? path.resolve(values.storage)
  : fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-bench-review-'));
const port = 3400 + Math.floor(Math.random() * 500);
const baseUrl = `http://127.0.0.1:${port}`;
const env = {
  ...process.env,
  PORT: String(port),
  KINEFOLD_STORAGE_DIR: path.join(work, 'storage'),
  KINEFOLD_DEMO: 'accounts',
};

/** How often each flag is raised on the seeded clips (made up, roughly what field footage gives). */
const FLAG_RATES: Record<FlagName, number> = {
  dark: 0.08,
  overexposed: 0.04,
  blurry: 0.1,
  static: 0.06,
  short: 0.03,
  'cut-heavy': 0.05,
  shaky: 0.05,
  duplicate: 0.02,
};
const PROJECTS = 8;
const SITES = 40;
const UPLOADERS = 12;

/** The queries a curator's day is made of: the default order, signal sorts, flag filters, narrowing, a deep page. */
const SCENARIOS: [name: string, query: string][] = [
  ['oldest first (default)', ''],
  ['sharpest first', 'sort=-medianSharpness'],
  ['flagged dark, darkest first', 'hasFlag=dark&sort=meanLuma'],
  ['likely accepts: no flags, most consistent', 'flagged=false&sort=-consistentShare'],
  ['lacks dark/blurry/static, most pairs', 'lacksFlag=dark,blurry,static&sort=-usablePairs'],
  ['one project, least motion', 'projectId=3&sort=meanMotion'],
  ['one site and uploader', 'site=Site%2007&uploaderId=5'],
  ['captured in March, most cuts', 'capturedFrom=2026-03-01T00:00:00Z&capturedTo=2026-03-31T23:59:59Z&sort=-cutCount'],
  ['page 200 of the default order', 'page=200'],
];

const stamp = (date: Date) => date.toISOString().replace('T', ' ').replace('Z', ' +00:00');

async function seed(sequelize: Sequelize): Promise<void> {
  const random = mulberry32(8);
  const admin = (await User.findByEmail('admin@kinefold.test'))!;
  const uploaders = [admin.id];
  for (let i = 1; i < UPLOADERS; i += 1) {
    // Nobody signs in as these uploaders, so they get no usable password.
    uploaders.push(
      (
        await User.create({
          email: `field-${i}@bench.test`,
          name: `Field operator ${i}`,
          role: 'operator',
          passwordHash: 'no-password',
        })
      ).id,
    );
  }
  const projects: number[] = [];
  for (let i = 1; i <= PROJECTS; i += 1) {
    projects.push(
      (
        await Project.create({
          name: `Campaign ${i}`,
          estimator: 'farneback',
          estimatorParams: {},
          sampleFps: 5,
          workingSize: 320,
          deltas: [1, 2],
          flagThresholds: {},
        })
      ).id,
    );
  }
  const pick = <T>(list: readonly T[]) => list[Math.floor(random() * list.length)]!;
  const start = Date.parse('2026-01-01T00:00:00Z');
  // One transaction: 200 commits of a 16-index table would spend most of the time syncing.
  const transaction = await sequelize.transaction();
  for (let first = 0; first < CLIPS; first += BATCH) {
    const rows: string[] = [];
    for (let n = first; n < Math.min(first + BATCH, CLIPS); n += 1) {
      const flags = FLAG_NAMES.filter((flag) => random() < FLAG_RATES[flag]);
      const hasMotion = random() < 0.9;
      const state = random() < 0.8 ? 'awaiting_review' : pick(['accepted', 'rejected']);
      const captured = new Date(start + random() * 300 * 86_400_000);
      const created = new Date(captured.getTime() + random() * 10 * 86_400_000);
      const fields = [
        pick(projects),
        pick(uploaders),
        `pass-${n}.mp4`,
        5e7,
        // Stored bytes as reconcile-usage measures them: the seeded clips have no files.
        0,
        createHash('sha256').update(String(n)).digest('hex'),
        'mp4',
        state,
        'mov,mp4,m4a,3gp,3g2,mj2',
        'h264',
        5 + random() * 55,
        25,
        1920,
        1080,
        0,
        `Site ${String(Math.floor(random() * SITES)).padStart(2, '0')}`,
        'tractor mount',
        stamp(captured),
        '[]',
        '',
        JSON.stringify(flags),
        '[]',
        100,
        Math.floor(random() * random() * 12),
        20 + random() * 400,
        10 + random() * 220,
        hasMotion ? random() * 4 : null,
        hasMotion ? 0.4 + random() * 0.6 : null,
        Math.floor(random() * 400),
        1,
        1,
        // As a current installation stores clips; the original format would have the worker convert them all.
        'packed',
        stamp(created),
        stamp(created),
      ];
      const sql = (value: string | number | null) => (value === null ? 'NULL' : sequelize.escape(value));
      rows.push(`(${fields.map(sql).join(', ')})`);
    }
    await sequelize.query(
      `INSERT INTO clips (projectId, uploaderId, originalName, sizeBytes, storedBytes, sha256,
      sourceExt, state, container, codec, durationS, fps, width, height, rotation, site, rig, capturedAt, tags, notes,
      flags, flagDetails, frameCount, cutCount, medianSharpness, meanLuma, meanMotion, consistentShare, usablePairs,
      hasPreview, hasThumbnail, derivedFormat, createdAt, updatedAt) VALUES ${rows.join(', ')}`,
      { transaction },
    );
  }
  await transaction.commit();
}

function quantile(sorted: number[], q: number): number {
  return sorted[Math.min(sorted.length - 1, Math.ceil(q * sorted.length) - 1)]!;
}

async function timeRuns(run: () => Promise<unknown>): Promise<{ p50: number; p95: number }> {
  for (let i = 0; i < WARM_UP; i += 1) await run();
  const times: number[] = [];
  for (let i = 0; i < RUNS; i += 1) {
    const begin = performance.now();
    await run();
    times.push(performance.now() - begin);
  }
  times.sort((a, b) => a - b);
  return { p50: quantile(times, 0.5), p95: quantile(times, 0.95) };
}

async function signIn(): Promise<string> {
  const curator = DEMO_ACCOUNTS.find((account) => account.role === 'curator')!;
  const cookieOf = (response: Response, old = '') => {
    const jar = new Map(
      old
        .split('; ')
        .filter(Boolean)
        .map((pair) => [pair.split('=')[0]!, pair]),
    );
    for (const cookie of response.headers.getSetCookie()) jar.set(cookie.split('=')[0]!, cookie.split(';')[0]!);
    return [...jar.values()].join('; ');
  };
  const first = await fetch(`${baseUrl}/api/auth/csrf`);
  const cookie = cookieOf(first);
  const { token } = (await first.json()) as { token: string };
  const signedIn = await fetch(`${baseUrl}/api/auth/sign-in`, {
    method: 'POST',
    body: JSON.stringify({ email: curator.email, password: curator.password }),
    headers: { cookie, 'content-type': 'application/json', 'x-csrf-token': token },
  });
  if (!signedIn.ok) throw new Error(`sign-in answered ${signedIn.status}`);
  return cookieOf(signedIn, cookie);
}

await promisify(execFile)(process.execPath, ['--import', 'tsx', 'server/cli/prepare.ts'], { env });
const config = loadConfig(env);
const sequelize = await openKinefoldDatabase(config);
const seedStart = performance.now();
const [{ present }] = await sequelize.query<{ present: number }>('SELECT COUNT(*) AS present FROM clips', {
  type: QueryTypes.SELECT,
});
if (present === 0) await seed(sequelize);
const [{ waiting }] = await sequelize.query<{ waiting: number }>(
  "SELECT COUNT(*) AS waiting FROM clips WHERE state = 'awaiting_review'",
  { type: QueryTypes.SELECT },
);
console.log(
  present === 0
    ? `seeded ${CLIPS} clips (${waiting} awaiting review) in ${((performance.now() - seedStart) / 1000).toFixed(1)} s`
    : `reusing ${present} clips (${waiting} awaiting review) in ${work}`,
);

// The server's output goes to a log beside the database, shown if a request fails.
const serverLog = path.join(work, 'server.log');
const logFd = fs.openSync(serverLog, 'w');
const server = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
  env,
  stdio: ['ignore', logFd, logFd],
});
try {
  for (let i = 0; i < 150; i += 1) {
    if (
      await fetch(`${baseUrl}/api/health`).then(
        (r) => r.ok,
        () => false,
      )
    )
      break;
    await new Promise((done) => setTimeout(done, 200));
  }
  const cookie = await signIn();
  console.log(
    `\n${RUNS} runs each after ${WARM_UP} warm-up runs; API = HTTP request to the server (session, role` +
      ' check, validation, both statements, JSON); SQL = the same page and count statements on a direct connection.\n',
  );
  console.log('| query | matching | API p50 | API p95 | SQL p50 | SQL p95 | API p95 / SQL p95 |');
  console.log('|---|---|---|---|---|---|---|');
  // The floor of any signed-in request (session, user reload, JSON), for reading the API column.
  const floor = await timeRuns(async () => (await fetch(`${baseUrl}/api/me`, { headers: { cookie } })).arrayBuffer());
  console.log(
    `| reference: GET /api/me | – | ${floor.p50.toFixed(1)} ms | ${floor.p95.toFixed(1)} ms ` + '| – | – | – |',
  );
  let worst = 0;
  for (const [name, query] of SCENARIOS) {
    const url = `${baseUrl}/api/review/queue${query ? `?${query}` : ''}`;
    const probe = await fetch(url, { headers: { cookie } });
    if (!probe.ok) throw new Error(`${name}: the queue answered ${probe.status}: ${await probe.text()}`);
    const { total } = (await probe.json()) as { total: number };
    const api = await timeRuns(async () => (await fetch(url, { headers: { cookie } })).arrayBuffer());
    const parsed = reviewQueueQuerySchema.parse(Object.fromEntries(new URLSearchParams(query)));
    const sql = queueSql(parsed, new Date());
    const raw = await timeRuns(() =>
      Promise.all([
        sequelize.query(sql.page, { replacements: sql.replacements, type: QueryTypes.SELECT }),
        sequelize.query(sql.count, { replacements: sql.replacements, type: QueryTypes.SELECT }),
      ]),
    );
    worst = Math.max(worst, api.p95);
    console.log(
      `| ${name} | ${total} | ${api.p50.toFixed(1)} ms | ${api.p95.toFixed(1)} ms | ${raw.p50.toFixed(1)} ms ` +
        `| ${raw.p95.toFixed(1)} ms | ${(api.p95 / raw.p95).toFixed(2)}× |`,
    );
  }
  console.log(`\nworst API p95: ${worst.toFixed(1)} ms (goal < 50 ms) on ${os.cpus().length} cores`);
} catch (error) {
  console.error(
    `the benchmark stopped; the server's last words (${serverLog}):\n` +
      fs.readFileSync(serverLog, 'utf8').split('\n').slice(-30).join('\n'),
  );
  throw error;
} finally {
  server.kill('SIGTERM');
  await sequelize.close();
  fs.closeSync(logFd);
  if (!values.storage) fs.rmSync(work, { recursive: true, force: true });
}
