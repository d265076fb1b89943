import { spawn, type ChildProcess } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import sqlite3 from 'sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApiToken } from '../../server/core/people/api-tokens';
import type { PairsetDetail } from '../../shared/types/pairsets';
import { signInOverHttp } from '../helpers/http-session';
import { addMomentDescriptors } from '../helpers/moment-descriptors';
import { buildPairsetNow } from '../helpers/pairset-build';
import { addPairsetClip } from '../helpers/pairset-clips';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { startS3Fake } from '../helpers/s3-fake';
import { freshPostgresDatabase, type TestDatabase } from '../helpers/test-database';
import { addUser, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

/**
 * `npm run migrate:scale-out`, database half: a SQLite + folder installation populated through the services and
 * the API is copied into PostgreSQL by the command run as `npm` runs it; the server started on PostgreSQL with the
 * same folder then answers every read byte for byte as the SQLite one did, with the same session cookie.
 */
const REPO = path.resolve(import.meta.dirname, '../..');
const FRAMES = 6;
const work = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-scale-out-'));
const databases: TestDatabase[] = [];
let server: TestServer;
let runtime: TestRuntime;
let target: TestDatabase & { url: string };
let cookie: string;
let token: string;
let pairset: PairsetDetail;
let clipIds: number[];
/** Per clip, the frames before which a cut lies: no motion field joins the frame before to them. */
const cutsOf = new Map<number, number[]>();
let before: Map<string, Answer>;

interface Answer {
  status: number;
  type: string | null;
  bytes: number;
  sha256: string;
  /** The body itself when it is JSON, so a difference shows. */
  json?: string;
}

interface CommandRun {
  code: number | null;
  stdout: string;
  stderr: string;
}

async function newTarget(): Promise<TestDatabase & { url: string }> {
  const database = await freshPostgresDatabase();
  databases.push(database);
  return database;
}

/** Runs the command as `npm run migrate:scale-out` does; `onLine` sees each line of its output as it comes. */
function migrate(
  storageDir: string,
  databaseUrl: string,
  onLine: (line: string, child: ChildProcess) => void = () => undefined,
  env: NodeJS.ProcessEnv = {},
): Promise<CommandRun> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/cli/migrate-scale-out.ts'], {
    cwd: REPO,
    env: {
      ...process.env,
      KINEFOLD_STORAGE_DIR: storageDir,
      KINEFOLD_DATABASE_URL: databaseUrl,
      KINEFOLD_OBJECT_STORE: '',
      ...env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let stdout = '';
  let stderr = '';
  child.stdout!.setEncoding('utf8').on('data', (text: string) => {
    stdout += text;
    for (const line of text.split('\n').filter(Boolean)) onLine(line, child);
  });
  child.stderr!.setEncoding('utf8').on('data', (text: string) => (stderr += text));
  return new Promise((resolve) => child.on('close', (code) => resolve({ code, stdout, stderr })));
}

async function onPostgres<T>(url: string, work: (client: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    return await work(client);
  } finally {
    await client.end();
  }
}

function onSqlite<T>(file: string, work: (database: sqlite3.Database) => Promise<T>): Promise<T> {
  const database = new sqlite3.Database(file);
  return work(database).finally(() => new Promise((done) => database.close(done)));
}

function sqliteAll(database: sqlite3.Database, sql: string): Promise<Record<string, unknown>[]> {
  return new Promise((resolve, reject) =>
    database.all(sql, (error, rows) => (error ? reject(error) : resolve(rows as Record<string, unknown>[]))),
  );
}

function sqliteRun(database: sqlite3.Database, sql: string, params: unknown[] = []): Promise<void> {
  return new Promise((resolve, reject) => database.run(sql, params, (error) => (error ? reject(error) : resolve())));
}

const sqliteFile = (storageDir: string) => path.join(storageDir, 'db', 'kinefold.sqlite');
const BOOKKEEPING = new Set(['schema_migrations', 'scale_out_copies']);

/** The Kinefold tables of a PostgreSQL database with each column's type, the migrations' own lists left out. */
async function postgresColumns(client: pg.Client): Promise<Map<string, Map<string, string>>> {
  const { rows } = await client.query<{ table: string; column: string; type: string }>(
    `SELECT table_name AS table, column_name AS column, data_type AS type FROM information_schema.columns
     WHERE table_schema = current_schema()`,
  );
  const tables = new Map<string, Map<string, string>>();
  for (const row of rows.filter((row) => !BOOKKEEPING.has(row.table))) {
    if (!tables.has(row.table)) tables.set(row.table, new Map());
    tables.get(row.table)!.set(row.column, row.type);
  }
  return tables;
}

/**
 * One value as plain JSON-able data, from how each driver gives it back: SQLite's 0/1, date text and JSON text, and
 * PostgreSQL's boolean, Date and parsed JSON, must say the same. Dates are read with JavaScript's Date, as the
 * product reads them.
 */
function normalised(value: unknown, type: string, from: 'sqlite' | 'postgres'): unknown {
  if (value === null || value === undefined) return null;
  if (type === 'boolean') return from === 'sqlite' ? value === 1 : value;
  if (type.startsWith('timestamp')) return new Date(value as string | Date).toISOString();
  if (type === 'json') return from === 'sqlite' ? JSON.parse(String(value)) : value;
  if (type === 'bytea') return (value as Buffer).toString('base64');
  if (type === 'bigint') return Number(value);
  return value;
}

/** Every row of every table on both sides, normalised and sorted, and the row counts per table. */
async function bothSides(storageDir: string, url: string) {
  const columns = await onPostgres(url, postgresColumns);
  const rowsOf = (rows: Record<string, unknown>[], types: Map<string, string>, from: 'sqlite' | 'postgres') =>
    rows
      .map((row) => JSON.stringify([...types].map(([column, type]) => [column, normalised(row[column], type, from)])))
      .sort();
  const sqlite: Record<string, string[]> = {};
  const postgres: Record<string, string[]> = {};
  await onSqlite(sqliteFile(storageDir), async (database) => {
    for (const [table, types] of columns) {
      sqlite[table] = rowsOf(await sqliteAll(database, `SELECT * FROM "${table}"`), types, 'sqlite');
    }
  });
  await onPostgres(url, async (client) => {
    for (const [table, types] of columns) {
      postgres[table] = rowsOf((await client.query(`SELECT * FROM "${table}"`)).rows, types, 'postgres');
    }
  });
  const counts = (side: Record<string, string[]>) =>
    Object.fromEntries(Object.entries(side).map(([table, rows]) => [table, rows.length]));
  return { sqlite, postgres, sqliteCounts: counts(sqlite), postgresCounts: counts(postgres) };
}

async function postgresCounts(url: string): Promise<Record<string, number>> {
  return onPostgres(url, async (client) => {
    const counts: Record<string, number> = {};
    for (const table of (await postgresColumns(client)).keys()) {
      counts[table] = Number((await client.query(`SELECT COUNT(*) AS n FROM "${table}"`)).rows[0].n);
    }
    return counts;
  });
}

async function freePort(): Promise<number> {
  const probe = net.createServer();
  await new Promise<void>((done) => probe.listen(0, '127.0.0.1', done));
  const { port } = probe.address() as net.AddressInfo;
  await new Promise((done) => probe.close(done));
  return port;
}

/** `npm run server` on PostgreSQL over the storage folder (or, with `env`, a bucket), once it answers. */
async function startServerOnPostgres(storageDir: string, databaseUrl: string, env: NodeJS.ProcessEnv = {}) {
  const port = await freePort();
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    cwd: REPO,
    env: {
      ...process.env,
      PORT: String(port),
      KINEFOLD_STORAGE_DIR: storageDir,
      KINEFOLD_DATABASE_URL: databaseUrl,
      KINEFOLD_OBJECT_STORE: '',
      KINEFOLD_DEMO: 'off',
      ...env,
    },
    stdio: ['ignore', 'ignore', 'inherit'],
  });
  const baseUrl = `http://127.0.0.1:${port}`;
  for (let tries = 0; ; tries += 1) {
    const up = await fetch(`${baseUrl}/api/health`).then(
      (response) => response.ok,
      () => false,
    );
    if (up) break;
    if (tries > 300 || child.exitCode !== null) throw new Error('the server on PostgreSQL did not start');
    await new Promise((done) => setTimeout(done, 100));
  }
  return {
    baseUrl,
    stop: () =>
      new Promise<void>((done) => {
        child.once('exit', () => done());
        child.kill('SIGTERM');
      }),
  };
}

/** What the product serves for a read: every clip, frame, field, pairset shard and list an admin can see. */
function readsToCompare(): string[] {
  const urls = [
    '/api/me',
    '/api/users',
    '/api/projects',
    '/api/clips',
    '/api/review/queue',
    '/api/pairsets',
    `/api/pairsets/${pairset.id}`,
    `/api/pairsets/${pairset.id}/manifest`,
    `/api/pairsets/${pairset.id}/difficulty`,
    ...pairset.shards.map((shard) => `/api/pairsets/${pairset.id}/shards/${shard.index}`),
    '/api/audit',
    '/api/audit.csv',
    '/api/jobs',
    '/api/invitations',
    '/api/admin/tokens',
    '/api/settings/reject-reasons',
  ];
  for (const id of clipIds) {
    urls.push(`/api/clips/${id}`, `/api/clips/${id}/frames`, `/api/clips/${id}/cuts`);
    for (let index = 0; index < FRAMES; index += 1) {
      urls.push(`/api/clips/${id}/frames/${index}`, `/api/clips/${id}/views/${index}/luma`);
      if (index < FRAMES - 1 && !cutsOf.get(id)!.includes(index + 1)) {
        urls.push(`/api/clips/${id}/motion/${index}/flo`, `/api/clips/${id}/motion/${index}`);
      }
    }
  }
  return urls;
}

async function answers(baseUrl: string, headers: Record<string, string>): Promise<Map<string, Answer>> {
  const seen = new Map<string, Answer>();
  for (const url of readsToCompare()) {
    const response = await fetch(baseUrl + url, { headers });
    const body = Buffer.from(await response.arrayBuffer());
    const type = response.headers.get('content-type');
    seen.set(url, {
      status: response.status,
      type,
      bytes: body.length,
      sha256: createHash('sha256').update(body).digest('hex'),
      ...(type?.includes('json') ? { json: body.toString('utf8') } : {}),
    });
  }
  return seen;
}

beforeAll(async () => {
  // The installation: SQLite and the storage folder, whatever the vitest project.
  server = await startTestServer({ databaseUrl: null });
  runtime = startTestRuntime(server);
  const admin = await addUser(server, 'admin');
  const engineer = await addUser(server, 'engineer');
  const curatorUser = await addUser(server, 'curator');
  const operator = await addUser(server, 'operator');
  const adminAgent = await signedInAgent(server, admin.email);
  const curator = await signedInAgent(server, curatorUser.email);

  const project = await adminAgent.agent
    .post('/api/projects')
    .set('x-csrf-token', adminAgent.csrf)
    .send({ name: 'Terrace rows', description: 'Orchard terraces, spring pass', retentionDays: 30 })
    .expect(201);
  const projectId = project.body.id as number;
  const clips = [];
  for (let seed = 0; seed < 5; seed += 1) {
    const cutsBefore = seed === 1 ? [3] : [];
    clips.push(
      await addPairsetClip(server, {
        projectId,
        uploaderId: operator.id,
        frames: FRAMES,
        seed,
        cutsBefore,
        site: `Terrace ${seed % 2 === 0 ? 'north' : 'south'}`,
        tags: ['spring', `pass-${seed}`],
        capturedAt: new Date(Date.UTC(2026, 3, 7, 9, 15 + seed)),
        state: seed < 3 ? 'accepted' : 'awaiting_review',
      }),
    );
    cutsOf.set(clips[seed]!.id, cutsBefore);
  }
  clipIds = clips.map((clip) => clip.id);
  await addMomentDescriptors(server, clipIds[0]!, FRAMES);

  // Verdicts through the review API: one accepted, one rejected.
  for (const [id, verdict] of [
    [clipIds[3]!, { decision: 'accept', comment: 'clean rows' }],
    [clipIds[4]!, { decision: 'reject', reason: 'too-dark', comment: 'dusk' }],
  ] as const) {
    await curator.agent.post(`/api/clips/${id}/claim`).set('x-csrf-token', curator.csrf).expect(200);
    await curator.agent.post(`/api/clips/${id}/verdict`).set('x-csrf-token', curator.csrf).send(verdict).expect(200);
  }
  await adminAgent.agent
    .put('/api/settings/reject-reasons')
    .set('x-csrf-token', adminAgent.csrf)
    .send({
      reasons: [
        { code: 'too-dark', label: 'Too dark' },
        { code: 'fogged', label: 'Fogged lens' },
      ],
    })
    .expect(200);
  await adminAgent.agent
    .post('/api/invitations')
    .set('x-csrf-token', adminAgent.csrf)
    .send({ email: 'row-hand@example.test', role: 'operator' })
    .expect(201);

  pairset = await buildPairsetNow(runtime, engineer, {
    projectIds: [projectId],
    views: ['frame', 'neighbour', 'motion'],
    shardMB: 0.05,
  });
  expect(pairset.state).toBe('built');
  expect(pairset.shards.length).toBeGreaterThan(1);
  token = (await createApiToken(engineer.id, 'training rig')).token;
  // A job left queued: no worker runs it before the move.
  await adminAgent.agent.post('/api/admin/reconcile').set('x-csrf-token', adminAgent.csrf).expect(202);

  // What the SQLite installation serves, read by a signed-in admin over HTTP.
  const listener = server.app.listen(0, '127.0.0.1');
  await new Promise<void>((resolve) => listener.once('listening', () => resolve()));
  const baseUrl = `http://127.0.0.1:${(listener.address() as net.AddressInfo).port}`;
  ({ cookie } = await signInOverHttp(baseUrl, admin.email));
  before = await answers(baseUrl, { cookie });
  listener.closeAllConnections();
  await new Promise((done) => listener.close(done));
  await runtime.close();
  // Kinefold is stopped before the move: nothing writes to the SQLite file from here on.
  await server.release();
  target = await newTarget();
}, 240_000);

afterAll(async () => {
  await server?.close();
  for (const database of databases) await database.drop();
  fs.rmSync(work, { recursive: true, force: true });
});

describe('npm run migrate:scale-out with KINEFOLD_DATABASE_URL', () => {
  it('copies every table of the SQLite installation into PostgreSQL, row for row', async () => {
    const run = await migrate(server.storageDir, target.url);
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(/stop the Kinefold server and every worker/);
    expect(run.stdout).toMatch(/database copied: \d+ tables, \d+ rows\./);

    const { sqlite, postgres, sqliteCounts, postgresCounts } = await bothSides(server.storageDir, target.url);
    expect(postgresCounts).toEqual(sqliteCounts);
    // Every kind of row the installation made is there, not only empty tables.
    for (const table of ['users', 'projects', 'clips', 'frames', 'motion_fields', 'verdicts', 'pairsets', 'shards']) {
      expect(sqliteCounts[table], table).toBeGreaterThan(0);
    }
    for (const table of ['audit_events', 'jobs', 'sessions', 'settings', 'invitations', 'mail_outbox']) {
      expect(sqliteCounts[table], table).toBeGreaterThan(0);
    }
    expect(sqliteCounts.moment_descriptors).toBe(1);
    for (const table of Object.keys(sqlite)) expect(postgres[table], table).toEqual(sqlite[table]);
  });

  it('moves each id sequence past the copied rows, so new rows get new ids', async () => {
    await onPostgres(target.url, async (client) => {
      for (const table of ['users', 'clips', 'frames', 'audit_events', 'jobs', 'shards']) {
        const { rows } = await client.query(
          `SELECT (SELECT MAX(id) FROM "${table}") AS max, nextval(pg_get_serial_sequence('"${table}"', 'id')) AS next`,
        );
        expect(Number(rows[0].next), table).toBe(Number(rows[0].max) + 1);
      }
    });
  });

  it('leaves a server on PostgreSQL serving the same clips, frames, fields and shards byte for byte', async () => {
    const running = await startServerOnPostgres(server.storageDir, target.url);
    try {
      // The session cookie from the SQLite server still signs the admin in: sessions were copied.
      const after = await answers(running.baseUrl, { cookie });
      expect([...after.keys()]).toEqual([...before.keys()]);
      for (const [url, answer] of before) {
        expect(answer.status, url).toBe(200);
        expect(after.get(url), url).toEqual(answer);
      }
      // The engineer's API token works too: its hash came along.
      const manifest = await fetch(`${running.baseUrl}/api/pairsets/${pairset.id}/manifest`, {
        headers: { authorization: `Bearer ${token}` },
      });
      expect(manifest.status).toBe(200);
      const shards = (JSON.parse(await manifest.text()) as { shards: { sha256: string }[] }).shards;
      expect(shards.map((shard) => shard.sha256)).toEqual(pairset.shards.map((shard) => shard.sha256));
    } finally {
      await running.stop();
    }
  });

  it('run again, copies nothing and changes nothing', async () => {
    const copies = () =>
      onPostgres(
        target.url,
        async (client) => (await client.query('SELECT * FROM scale_out_copies ORDER BY "tableName"')).rows,
      );
    const recorded = await copies();
    const counts = await postgresCounts(target.url);
    const run = await migrate(server.storageDir, target.url);
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(/database: nothing to copy, all \d+ tables were copied before\./);
    expect(await copies()).toEqual(recorded);
    expect(await postgresCounts(target.url)).toEqual(counts);
  });

  it('with KINEFOLD_OBJECT_STORE too, moves the files into a bucket that then serves the same bytes', async () => {
    const fake = await startS3Fake();
    const bucket = { ...fake.env, KINEFOLD_OBJECT_STORE: `s3://${fake.bucket}/moved` };
    try {
      // A database of its own, so the server that the test before ran on the first copy changes nothing here.
      const both = await newTarget();
      const run = await migrate(server.storageDir, both.url, undefined, bucket);
      // The AWS SDK warns about this Node.js version on stderr; nothing else may be there.
      expect(run.stderr.split('\n').filter((line) => /error|^\s+at /i.test(line))).toEqual([]);
      expect(run.code).toBe(0);
      expect(run.stdout).toMatch(/objects copied/);
      // A storage folder without clips or pairsets: only the session secret comes along, so the cookie still
      // signs in, and every file the server sends must come from the bucket.
      const emptied = path.join(work, 'bucket-only');
      fs.cpSync(path.join(server.storageDir, 'db', 'server-secret'), path.join(emptied, 'db', 'server-secret'));
      const running = await startServerOnPostgres(emptied, both.url, bucket);
      try {
        const after = await answers(running.baseUrl, { cookie });
        for (const [url, answer] of before) expect(after.get(url), url).toEqual(answer);
      } finally {
        await running.stop();
      }
      expect(fs.readdirSync(emptied)).not.toContain('clips');
      expect(fs.readdirSync(emptied)).not.toContain('pairsets');
    } finally {
      await fake.close();
    }
  });
});

/** A copy of the installation's database in a storage folder of its own, changed by `change` (stopped Kinefold). */
async function installationCopy(name: string, change: (database: sqlite3.Database) => Promise<void>) {
  const storageDir = path.join(work, name);
  fs.mkdirSync(path.join(storageDir, 'db'), { recursive: true });
  fs.copyFileSync(sqliteFile(server.storageDir), sqliteFile(storageDir));
  await onSqlite(sqliteFile(storageDir), change);
  return storageDir;
}

/** Rows enough that copying them takes a few seconds: an audit trail of 40,000 sign-ins. */
const LONG_AUDIT_TRAIL = 40_000;

describe('a copy that is interrupted', () => {
  it('is killed mid-table, keeps the tables finished before, and completes when run again', async () => {
    const storageDir = await installationCopy('long-trail', (database) =>
      sqliteRun(
        database,
        `WITH RECURSIVE n(i) AS (SELECT 1 UNION ALL SELECT i + 1 FROM n WHERE i < ?)
         INSERT INTO audit_events ("actorId", action, "targetType", "targetId", detail, at)
         SELECT 1, 'auth.sign_in', 'user', '1', '{"via":"password"}', '2026-04-07 09:15:00.000 +00:00' FROM n`,
        [LONG_AUDIT_TRAIL],
      ),
    );
    const interrupted = await newTarget();
    const killed = await migrate(storageDir, interrupted.url, (line, child) => {
      if (/^ {2}audit_events: \d+ of \d+ rows$/.test(line)) child.kill('SIGKILL');
    });
    expect(killed.code).toBeNull();
    expect(killed.stdout).toMatch(/users: \d+ rows copied/);
    expect(killed.stdout).not.toMatch(/audit_events: \d+ rows copied/);
    await onPostgres(interrupted.url, async (client) => {
      // The table being copied kept nothing; the ones before it are recorded as done.
      expect(Number((await client.query('SELECT COUNT(*) AS n FROM audit_events')).rows[0].n)).toBe(0);
      const done = (await client.query('SELECT "tableName" FROM scale_out_copies')).rows.map((row) => row.tableName);
      expect(done).toContain('users');
      expect(done).not.toContain('audit_events');
    });

    const resumed = await migrate(storageDir, interrupted.url);
    expect(resumed.stderr).toBe('');
    expect(resumed.code).toBe(0);
    expect(resumed.stdout).toMatch(/database copied: \d+ tables, \d+ rows; \d+ tables were copied before\./);
    expect(resumed.stdout).not.toMatch(/ users: \d+ rows copied/);
    const { sqlite, postgres, sqliteCounts, postgresCounts } = await bothSides(storageDir, interrupted.url);
    expect(postgresCounts).toEqual(sqliteCounts);
    expect(postgresCounts.audit_events).toBeGreaterThan(LONG_AUDIT_TRAIL);
    expect(postgres.audit_events).toEqual(sqlite.audit_events);
  }, 240_000);
});

describe('what the copy refuses, changing nothing', () => {
  const oneLine = (run: CommandRun) => {
    expect(run.code).toBe(1);
    const lines = run.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).not.toMatch(/^\s+at /);
    return lines[0]!;
  };
  const tablesIn = (url: string) =>
    onPostgres(url, async (client) =>
      Number(
        (await client.query(`SELECT COUNT(*) AS n FROM information_schema.tables WHERE table_schema = 'public'`))
          .rows[0].n,
      ),
    );

  it('refuses while a worker beats in the SQLite database', async () => {
    const storageDir = await installationCopy('live-worker', async (database) => {
      const now = new Date().toISOString().replace('T', ' ').replace('Z', ' +00:00');
      await sqliteRun(
        database,
        `INSERT INTO worker_presences (name, host, pid, version, "leaseS", "jobsRunning", "startedAt", "lastBeatAt")
         VALUES ('field-box:4242:ab12', 'field-box', 4242, '0.1.0', 60, 1, ?, ?)`,
        [now, now],
      );
      await sqliteRun(
        database,
        `UPDATE jobs SET state = 'running', "leaseOwner" = 'field-box:4242:ab12' WHERE id =
        (SELECT MAX(id) FROM jobs)`,
      );
    });
    const untouched = await newTarget();
    const line = oneLine(await migrate(storageDir, untouched.url));
    expect(line).toContain('a Kinefold worker may still be writing to the SQLite database: field-box:4242:ab12');
    expect(line).toMatch(/field-box:4242:ab12 \(last heartbeat \d+ s ago, 1 job leased\)/);
    expect(line).toMatch(/Stop the server and every worker/);
    expect(await tablesIn(untouched.url)).toBe(0);
  });

  it('refuses a PostgreSQL database that already holds Kinefold data from elsewhere', async () => {
    const elsewhere = await newTarget();
    // Another installation's first start on that database: its demo accounts.
    await new Promise<void>((resolve, reject) =>
      spawn(process.execPath, ['--import', 'tsx', 'server/cli/prepare.ts'], {
        cwd: REPO,
        env: {
          ...process.env,
          KINEFOLD_STORAGE_DIR: path.join(work, 'elsewhere'),
          KINEFOLD_DATABASE_URL: elsewhere.url,
          KINEFOLD_DEMO: 'accounts',
          KINEFOLD_BCRYPT_COST: '10',
        },
        stdio: 'ignore',
      }).on('exit', (code) => (code === 0 ? resolve() : reject(new Error(`prepare-db exited ${code}`)))),
    );
    const countsBefore = await postgresCounts(elsewhere.url);
    const line = oneLine(await migrate(server.storageDir, elsewhere.url));
    expect(line).toMatch(
      /already holds Kinefold data that this copy did not write \(audit_events: 4 rows, users: 4 rows\)/,
    );
    expect(line).toMatch(/Nothing was changed\.$/);
    expect(await postgresCounts(elsewhere.url)).toEqual(countsBefore);
  });

  it('refuses a copy of this installation made before its SQLite database changed', async () => {
    const changed = await installationCopy('changed', (database) => sqliteRun(database, 'DELETE FROM sessions'));
    const counts = await postgresCounts(target.url);
    const line = oneLine(await migrate(changed, target.url));
    expect(line).toMatch(/the SQLite database changed after its table sessions was copied \(\d+ rows then, 0 now\)/);
    expect(await postgresCounts(target.url)).toEqual(counts);
  });

  it('names the variable to set when neither half is asked for', async () => {
    const line = oneLine(await migrate(server.storageDir, ''));
    expect(line).toBe(
      'Kinefold migration: set KINEFOLD_DATABASE_URL (to copy the SQLite database into PostgreSQL), ' +
        'KINEFOLD_OBJECT_STORE (to copy the storage folder into a bucket), or both.',
    );
  });

  it('names KINEFOLD_STORAGE_DIR when there is no SQLite database to copy', async () => {
    const empty = path.join(work, 'empty');
    fs.mkdirSync(empty);
    const untouched = await newTarget();
    const line = oneLine(await migrate(empty, untouched.url));
    expect(line).toMatch(/KINEFOLD_STORAGE_DIR: there is no SQLite database at .*kinefold\.sqlite to copy/);
    expect(await tablesIn(untouched.url)).toBe(0);
  });
});
