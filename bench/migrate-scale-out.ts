/**
 * Scale-out copy benchmark (not a test): seeds a SQLite installation of 100,000 clips (with their frames, motion
 * fields, verdicts, jobs and audit trail) and copies it into a new PostgreSQL database with the copy
 * `npm run migrate:scale-out` runs, next to two floors measured in the same run: reading every row from SQLite in
 * the copy's batches, and PostgreSQL inserting the same rows into tables like the target's from its own copy
 * (`INSERT … SELECT`, no client, no foreign-key checks). Reports the copy's time against the sum of the floors, and
 * the process's peak memory, which must not grow with the installation (rows are streamed in batches).
 *   npm run bench:migrate-scale-out [-- --clips 100000 --frames 10] [--postgres postgres://postgres@127.0.0.1:5432/test]
 */
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import pg from 'pg';
import { databasePath, loadConfig } from '../server/core/config';
import { openKinefoldDatabase } from '../server/core/db/open';
import { copyDatabase } from '../server/core/db/scale-out/copy-database';
import { SqliteSource } from '../server/core/db/scale-out/sqlite-source';
import { Project, User } from '../server/core/models';

const { values } = parseArgs({
  options: {
    clips: { type: 'string', default: '100000' },
    frames: { type: 'string', default: '10' },
    postgres: { type: 'string', default: 'postgres://postgres@127.0.0.1:5432/test' },
  },
});
const CLIPS = Number(values.clips);
const FRAMES = Number(values.frames);
const USERS = 12;
const PROJECTS = 8;
/** The copy's read batch (postgres-target.ts ROWS_PER_BATCH), for the read floor. */
const READ_BATCH = 1_000;
const RSS_SAMPLE_MS = 100;

const work = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-bench-scale-out-'));
const config = loadConfig({ KINEFOLD_STORAGE_DIR: work, KINEFOLD_DEMO: 'off' });
const sqliteFile = databasePath(config);

/** Sequelize's SQLite date text for `minutes` after the start of 2026, as SQL. */
const stamp = (minutes: string) =>
  `strftime('%Y-%m-%d %H:%M:%f', '2026-01-01', '+' || (${minutes}) || ' minutes') || ' +00:00'`;
const numbers = (count: number) => `WITH RECURSIVE n(i) AS (SELECT 1 UNION ALL SELECT i + 1 FROM n WHERE i < ${count})`;

async function seed(): Promise<void> {
  const sequelize = await openKinefoldDatabase(config);
  const users: number[] = [];
  for (let i = 1; i <= USERS; i += 1) {
    const role = i === 1 ? 'admin' : i <= 3 ? 'curator' : 'operator';
    users.push(
      (await User.create({ email: `person-${i}@bench.test`, name: `Person ${i}`, role, passwordHash: 'none' })).id,
    );
  }
  for (let i = 1; i <= PROJECTS; i += 1) {
    await Project.create({
      name: `Campaign ${i}`,
      estimator: 'dis',
      estimatorParams: {},
      sampleFps: 5,
      workingSize: 320,
      deltas: [1, 2],
      flagThresholds: {},
    });
  }
  const statements = [
    `${numbers(CLIPS)} INSERT INTO clips ("projectId", "uploaderId", "originalName", "sizeBytes", "storedBytes",
       sha256, "sourceExt", state, container, codec, "durationS", fps, width, height, site, rig, "capturedAt", tags,
       flags, "flagDetails", "frameCount", "cutCount", "medianSharpness", "meanLuma", "meanMotion", "consistentShare",
       "usablePairs", "hasPreview", "hasThumbnail", "derivedFormat", "createdAt", "updatedAt")
     SELECT 1 + i % ${PROJECTS}, 4 + i % ${USERS - 3}, 'pass-' || i || '.mp4', 50000000 + i, 60000000 + i,
       printf('%064d', i), 'mp4', CASE i % 5 WHEN 0 THEN 'accepted' WHEN 1 THEN 'rejected' ELSE 'awaiting_review' END,
       'mov,mp4,m4a,3gp,3g2,mj2', 'h264', 5 + i % 55, 25, 1920, 1080, 'Site ' || (i % 40), 'tractor mount',
       ${stamp('i * 3')}, '["spring"]', CASE WHEN i % 9 = 0 THEN '["dark"]' ELSE '[]' END, '[]', ${FRAMES},
       i % 3, 20 + i % 400, 10 + i % 220, (i % 400) / 100.0, 0.4 + (i % 60) / 100.0, ${FRAMES - 1}, 1, 1, 'packed',
       ${stamp('i * 3 + 60')}, ${stamp('i * 3 + 60')}
     FROM n`,
    `${numbers(FRAMES)} INSERT INTO frames ("clipId", "index", "timeS", "meanLuma", contrast, sharpness,
       "clippedShare", "clippedHighShare", "cutBefore", "cutScore", dhash, "cutEvidence")
     SELECT clips.id, n.i - 1, (n.i - 1) / 5.0, 100 + n.i, 0.2, 150.5 + n.i, 0, 0, 0, 0.01 * n.i,
       printf('%016x', clips.id * 31 + n.i), '{"fired":[]}'
     FROM clips, n`,
    `${numbers(FRAMES - 1)} INSERT INTO motion_fields ("clipId", "fromIndex", "toIndex", direction, estimator, params,
       "meanMagnitude", "p95Magnitude", "consistentShare", "medianU", "medianV", "maxMagnitude",
       "consistentP95Magnitude")
     SELECT clips.id, n.i - 1, n.i, 'forward', 'dis', '{"finestScale":1}', 1.5, 3.25, 0.9, 0.5, -0.25, 6.5, 3
     FROM clips, n`,
    `INSERT INTO verdicts ("clipId", "curatorId", decision, reason, "reasonLabel", comment, bulk, at)
     SELECT id, 2, CASE state WHEN 'accepted' THEN 'accept' ELSE 'reject' END,
       CASE state WHEN 'rejected' THEN 'too-dark' END, CASE state WHEN 'rejected' THEN 'Too dark' END, '', 0,
       "updatedAt"
     FROM clips WHERE state IN ('accepted', 'rejected')`,
    `INSERT INTO jobs (kind, "clipId", payload, state, attempts, progress, "runAfter", "finishedAt", "startedAt",
       "lastWorker", "createdAt", "updatedAt")
     SELECT 'process-clip', id, '{"clipId":' || id || '}', 'done', 1, 1, "createdAt", "updatedAt", "createdAt",
       'bench:1:ab', "createdAt", "updatedAt"
     FROM clips`,
    `INSERT INTO audit_events ("actorId", action, "targetType", "targetId", detail, at)
     SELECT "uploaderId", 'clip.upload', 'clip', CAST(id AS TEXT), '{"bytes":' || "sizeBytes" || '}', "createdAt"
     FROM clips`,
  ];
  const transaction = await sequelize.transaction();
  for (const statement of statements) await sequelize.query(statement, { transaction });
  await transaction.commit();
  await sequelize.close();
}

async function readFloor(): Promise<{ ms: number; rows: number }> {
  const source = await SqliteSource.open(sqliteFile);
  const begin = performance.now();
  let rows = 0;
  for (const table of await source.tables()) {
    if (table === 'schema_migrations' || table === 'scale_out_copies') continue;
    for await (const batch of source.batches(table, await source.columns(table), READ_BATCH)) rows += batch.length;
  }
  const ms = performance.now() - begin;
  await source.close();
  return { ms, rows };
}

/** PostgreSQL copying each copied table into a new table with the same columns and indexes, by itself. */
async function postgresFloor(url: string): Promise<number> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  const tables = (
    await client.query<{ name: string }>(
      `SELECT table_name AS name FROM information_schema.tables WHERE table_schema = current_schema()
       AND table_type = 'BASE TABLE' AND table_name NOT IN ('schema_migrations', 'scale_out_copies')`,
    )
  ).rows.map((row) => row.name);
  let ms = 0;
  for (const table of tables) {
    await client.query(`CREATE TABLE "floor_${table}" (LIKE "${table}" INCLUDING ALL)`);
    const begin = performance.now();
    await client.query(`INSERT INTO "floor_${table}" SELECT * FROM "${table}"`);
    ms += performance.now() - begin;
    await client.query(`DROP TABLE "floor_${table}"`);
  }
  await client.end();
  return ms;
}

async function onServer(sql: string): Promise<void> {
  const client = new pg.Client({ connectionString: values.postgres });
  await client.connect();
  await client.query(sql);
  await client.end();
}

const load = os
  .loadavg()
  .map((value) => value.toFixed(1))
  .join(', ');
console.log(`Seeding ${CLIPS} clips with ${FRAMES} frames each into ${sqliteFile} …`);
const seedBegin = performance.now();
await seed();
console.log(`  seeded in ${((performance.now() - seedBegin) / 1000).toFixed(0)} s`);

const name = `kf_bench_${randomBytes(4).toString('hex')}`;
await onServer(`CREATE DATABASE ${name}`);
const target = new URL(values.postgres);
target.pathname = `/${name}`;
try {
  const read = await readFloor();
  const rssBefore = process.memoryUsage().rss;
  let rssPeak = rssBefore;
  const sampler = setInterval(() => (rssPeak = Math.max(rssPeak, process.memoryUsage().rss)), RSS_SAMPLE_MS);
  const begin = performance.now();
  const tally = await copyDatabase({ sqliteFile, databaseUrl: target.toString(), databaseCa: null });
  const copyMs = performance.now() - begin;
  clearInterval(sampler);
  const floorMs = await postgresFloor(target.toString());
  const seconds = (ms: number) => `${(ms / 1000).toFixed(1)} s`;
  const rate = (ms: number) => `${Math.round(read.rows / (ms / 1000)).toLocaleString('en')} rows/s`;
  console.log(
    `\n${CLIPS.toLocaleString('en')} clips: ${tally.copiedRows.toLocaleString('en')} rows in ${tally.tables} tables ` +
      `(SQLite file ${(fs.statSync(sqliteFile).size / 1024 ** 2).toFixed(0)} MB), ${os.cpus().length} cores, ` +
      `Node ${process.version}, load average ${load} at the start.\n`,
  );
  console.log('| step | time | throughput |');
  console.log('|---|---|---|');
  console.log(
    `| floor: reading every row from SQLite in batches of ${READ_BATCH} | ${seconds(read.ms)} | ${rate(read.ms)} |`,
  );
  console.log(`| floor: PostgreSQL inserting the same rows by itself | ${seconds(floorMs)} | ${rate(floorMs)} |`);
  console.log(`| the copy (migrate:scale-out) | ${seconds(copyMs)} | ${rate(copyMs)} |`);
  console.log(
    `\nThe copy took ${(copyMs / (read.ms + floorMs)).toFixed(2)}× the sum of the two floors. Peak memory ` +
      `${(rssPeak / 1024 ** 2).toFixed(0)} MB (${((rssPeak - rssBefore) / 1024 ** 2).toFixed(0)} MB above the ` +
      `${(rssBefore / 1024 ** 2).toFixed(0)} MB before the copy).`,
  );
} finally {
  await onServer(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
  fs.rmSync(work, { recursive: true, force: true });
}
