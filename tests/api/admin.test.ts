import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  AuditEvent,
  Clip,
  Job,
  MailOutbox,
  Project,
  QuotaWarning,
  UsageSnapshot,
  Verdict,
} from '../../server/core/models';
import { checkQuotaThresholds } from '../../server/core/usage/quota-warnings';
import { storagePaths } from '../../server/core/storage/paths';
import { csvField } from '../../server/core/audit/audit-log';
import { enqueueJob } from '../../server/core/jobs/enqueue';
import { retentionCandidates } from '../../server/core/clips/retention';
import { addProject, insertClip, makePatternClip } from '../helpers/pipeline-clips';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { addUser, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';
import { REMOVING_PREFIX } from '../../server/core/storage/remove-folder';

type SignedIn = Awaited<ReturnType<typeof signedInAgent>>;
let server: TestServer;
let runtime: TestRuntime;
let admin: SignedIn;
let operator: SignedIn;
let operatorId: number;
let adminId: number;
let projectId: number;
let clipId: number;
const media = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-admin-'));

beforeAll(async () => {
  server = await startTestServer();
  runtime = startTestRuntime(server);
  adminId = (await addUser(server, 'admin')).id;
  operatorId = (await addUser(server, 'operator')).id;
  admin = await signedInAgent(server, 'admin@example.test');
  operator = await signedInAgent(server, 'operator@example.test');
  projectId = (await addProject(adminId, 'Orchard rows')).id;
  const file = await makePatternClip(path.join(media, 'orchard.mp4'), 3);
  clipId = (await insertClip(server, file, projectId, operatorId)).clip.id;
  await runtime.drain();
}, 180_000);
afterAll(async () => {
  await runtime.close();
  await server.close();
  fs.rmSync(media, { recursive: true, force: true });
});

describe('admin routes', () => {
  const routes: [string, string][] = [
    ['get', '/api/admin/usage'],
    ['post', '/api/admin/reconcile'],
    ['get', '/api/jobs'],
    ['post', '/api/jobs/1/retry'],
    ['post', '/api/jobs/1/cancel'],
    ['get', '/api/audit'],
    ['get', '/api/audit.csv'],
  ];
  it('are 401 signed out and 403 for other roles', async () => {
    for (const [method, url] of routes) {
      const anonymous = await (request(server.app) as unknown as Record<string, (u: string) => request.Test>)[method]!(
        url,
      );
      expect([401, 403]).toContain(anonymous.status);
      const asOperator = await (operator.agent as unknown as Record<string, (u: string) => request.Test>)[method]!(
        url,
      ).set('x-csrf-token', operator.csrf);
      expect(asOperator.status).toBe(403);
    }
  });

  it('answer 400 naming the field for bad filters', async () => {
    const jobs = await admin.agent.get('/api/jobs?state=lost').expect(400);
    expect(jobs.body.error.message).toMatch(/^state/);
    const audit = await admin.agent.get('/api/audit?from=yesterday').expect(400);
    expect(audit.body.error.message).toMatch(/^from/);
    await admin.agent.post('/api/jobs/abc/retry').set('x-csrf-token', admin.csrf).expect(400);
  });
});

describe('jobs', () => {
  it('lists jobs with their target, and cancels and retries them', async () => {
    const list = await admin.agent.get('/api/jobs?kind=process-clip').expect(200);
    expect(list.body.items[0]).toMatchObject({
      kind: 'process-clip',
      state: 'done',
      target: `clip ${clipId} (orchard.mp4)`,
    });
    await admin.agent.post(`/api/jobs/${list.body.items[0].id}/cancel`).set('x-csrf-token', admin.csrf).expect(409);

    const reprocess = await admin.agent
      .post(`/api/clips/${clipId}/reprocess`)
      .set('x-csrf-token', admin.csrf)
      .expect(202);
    expect(reprocess.body.state).toBe('queued');
    const queued = await Job.findOne({ where: { clipId, state: 'queued' } });
    const cancelled = await admin.agent
      .post(`/api/jobs/${queued!.id}/cancel`)
      .set('x-csrf-token', admin.csrf)
      .expect(200);
    expect(cancelled.body.state).toBe('cancelled');
    expect((await Clip.findByPk(clipId))?.state).toBe('failed');

    const retried = await admin.agent.post(`/api/jobs/${queued!.id}/retry`).set('x-csrf-token', admin.csrf).expect(200);
    expect(retried.body).toMatchObject({ kind: 'process-clip', state: 'queued' });
    expect(await runtime.drain()).toBe(1);
    expect((await Clip.findByPk(clipId))?.state).toBe('awaiting_review');
    expect(await AuditEvent.count({ where: { action: 'job.cancel' } })).toBe(1);
  });

  it('gives each job its due time, start, finish, duration and worker, and names what a digest is for', async () => {
    const { body } = await admin.agent.get('/api/jobs?kind=process-clip&state=done').expect(200);
    const done = body.items[0];
    const row = (await Job.findByPk(done.id))!;
    expect(done).toMatchObject({
      worker: 'test-worker',
      startedAt: row.startedAt!.toISOString(),
      finishedAt: row.finishedAt!.toISOString(),
      runAfter: row.runAfter.toISOString(),
    });
    expect(Date.parse(done.startedAt)).toBeLessThanOrEqual(Date.parse(done.finishedAt));
    expect(done.durationS).toBeCloseTo((Date.parse(done.finishedAt) - Date.parse(done.startedAt)) / 1000, 6);

    const due = new Date(Math.floor(Date.now() / 1000) * 1000 + 3600_000);
    const digest = await server.sequelize.transaction((transaction) =>
      enqueueJob('send-rejection-digest', { uploaderId: operatorId }, { transaction, runAfter: due }),
    );
    const queued = await admin.agent.get('/api/jobs?kind=send-rejection-digest&state=queued').expect(200);
    expect(queued.body.items.find((job: { id: number }) => job.id === digest.id)).toMatchObject({
      target: `uploader ${operatorId}`,
      runAfter: due.toISOString(),
      startedAt: null,
      finishedAt: null,
      durationS: null,
      worker: null,
    });
    await digest.destroy();
  });
});

describe('usage and reconciliation', () => {
  it('finds and fixes planted drift: a file deleted behind its back, an old stray folder, a half-removed folder', async () => {
    const paths = storagePaths(server.storageDir);
    const before = Number((await Clip.findByPk(clipId))!.storedBytes);
    const frame = path.join(
      paths.clipDir(clipId),
      'frames',
      fs.readdirSync(path.join(paths.clipDir(clipId), 'frames'))[0]!,
    );
    const frameBytes = fs.statSync(frame).size;
    fs.rmSync(frame);
    const stray = paths.clipDir(9999);
    fs.mkdirSync(stray, { recursive: true });
    fs.writeFileSync(path.join(stray, 'source.mp4'), Buffer.alloc(1234));
    // Left an hour ago: a folder written to lately may be a clip whose admission has not committed yet.
    const anHourAgo = new Date(Date.now() - 3600_000);
    fs.utimesSync(path.join(stray, 'source.mp4'), anHourAgo, anHourAgo);
    const admitting = paths.clipDir(9997);
    fs.mkdirSync(admitting, { recursive: true });
    fs.writeFileSync(path.join(admitting, 'source.mp4'), Buffer.alloc(77));
    // What a clip delete leaves when the process dies between renaming the folder and removing it.
    const halfRemoved = path.join(paths.clipsDir, `${REMOVING_PREFIX}9998-0badf00d`);
    fs.mkdirSync(path.join(halfRemoved, 'frames'), { recursive: true });
    fs.writeFileSync(path.join(halfRemoved, 'frames', '000000.png'), Buffer.alloc(321));

    await admin.agent.post('/api/admin/reconcile').set('x-csrf-token', admin.csrf).expect(202);
    const again = await admin.agent.post('/api/admin/reconcile').set('x-csrf-token', admin.csrf).expect(202);
    expect(await Job.count({ where: { kind: 'reconcile-usage', state: 'queued' } })).toBe(1);
    expect(again.body.jobId).toBeGreaterThan(0);
    expect(await runtime.drain()).toBe(1);

    expect(Number((await Clip.findByPk(clipId))!.storedBytes)).toBe(before - frameBytes);
    expect(fs.existsSync(stray)).toBe(false);
    expect(fs.existsSync(admitting)).toBe(true);
    expect(fs.existsSync(halfRemoved)).toBe(false);
    const snapshot = await UsageSnapshot.findOne();
    expect(snapshot!.drift).toMatchObject({
      clips: [{ clipId, recordedBytes: before, actualBytes: before - frameBytes }],
      strayFolders: [
        { folder: 'clips/9999', bytes: 1234 },
        { folder: `clips/${REMOVING_PREFIX}9998-0badf00d`, bytes: 321 },
      ],
    });

    const usage = await admin.agent.get('/api/admin/usage').expect(200);
    const sumOfKinds = Object.values(usage.body.byKind as Record<string, number>).reduce((a, b) => a + b, 0);
    expect(sumOfKinds).toBe(before - frameBytes);
    expect(usage.body.byKind.source).toBe(Number((await Clip.findByPk(clipId))!.sizeBytes));
    expect(usage.body.byProject[0]).toMatchObject({ name: 'Orchard rows', usedBytes: before - frameBytes });
    expect(usage.body.disk.freeBytes).toBeGreaterThan(0);
    expect(usage.body.trend).toHaveLength(1);
  });
});

describe('quota threshold warnings', () => {
  it('mails admins and the operators concerned once per crossing, again after falling back below', async () => {
    const project = await Project.findByPk(projectId);
    const used = Number((await Clip.findByPk(clipId))!.storedBytes);
    const check = () =>
      Clip.sequelize!.transaction((t) => checkQuotaThresholds(projectId, operatorId, server.config.publicUrl, t));
    const mails = () => MailOutbox.count({ where: { template: 'quota-threshold' } });

    await project!.update({ quotaBytes: Math.ceil(used / 0.85) });
    await check();
    expect(await mails()).toBe(2);
    await check();
    expect(await mails()).toBe(2);
    const subject = (await MailOutbox.findOne({ where: { to: 'operator@example.test', template: 'quota-threshold' } }))!
      .subject;
    expect(subject).toBe('Project "Orchard rows" has used 80 % of its storage quota');

    await project!.update({ quotaBytes: used });
    await check();
    expect(await mails()).toBe(4);
    await project!.update({ quotaBytes: used * 10 });
    await check();
    expect(await QuotaWarning.count()).toBe(0);
    await project!.update({ quotaBytes: Math.ceil(used / 0.85) });
    await check();
    expect(await mails()).toBe(6);
  });
});

describe('audit log', () => {
  it('filters and exports as CSV', async () => {
    const list = await admin.agent.get('/api/audit?action=job.cancel').expect(200);
    expect(list.body.items).toHaveLength(1);
    expect(list.body.items[0]).toMatchObject({ actorName: 'Test admin', targetType: 'job' });
    const csv = await admin.agent.get('/api/audit.csv?targetType=job').expect(200);
    expect(csv.headers['content-type']).toMatch(/text\/csv/);
    const lines = csv.text.trim().split('\r\n');
    expect(lines[0]).toBe('at,actor,action,target type,target id,detail');
    expect(lines.some((line) => line.includes(',job.cancel,job,'))).toBe(true);
  });

  it('exports in the order the screen lists: newest first, or as sorted', async () => {
    const idsOf = (csvText: string) =>
      csvText
        .trim()
        .split('\r\n')
        .slice(1)
        .map((line) => line.split(',').slice(0, 3).join(','));
    const shown = (items: { at: string; actorName: string | null; action: string }[]) =>
      items.map((entry) => [entry.at, entry.actorName ?? 'Kinefold', entry.action].join(','));
    for (const sort of ['', '-at', 'at', 'action']) {
      const query = sort ? `?sort=${sort}` : '';
      const list = await admin.agent.get(`/api/audit${query}${query ? '&' : '?'}pageSize=200`).expect(200);
      expect(list.body.total).toBeGreaterThan(2);
      const csv = await admin.agent.get(`/api/audit.csv${query}`).expect(200);
      expect(idsOf(csv.text), `sort=${sort}`).toEqual(shown(list.body.items));
    }
    const newestFirst = (await admin.agent.get('/api/audit.csv').expect(200)).text.trim().split('\r\n').slice(1);
    const times = newestFirst.map((line) => line.split(',')[0]!);
    expect([...times].sort().reverse()).toEqual(times);
    await admin.agent.get('/api/audit.csv?sort=size').expect(400);
  });

  it('quotes CSV fields per RFC 4180 and defuses spreadsheet formulas', () => {
    expect(csvField('plain')).toBe('plain');
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField('=SUM(A1)')).toBe("'=SUM(A1)");
  });
});

describe('retention of rejected footage', () => {
  it('previews exactly what the run purges: old rejections only, accepted clips untouched, bytes released', async () => {
    const project = await Project.findByPk(projectId);
    const preview = () => admin.agent.get(`/api/admin/retention/preview?projectId=${projectId}`).expect(200);
    await project!.update({ retentionDays: null });
    expect((await preview()).body).toMatchObject({ retentionDays: null, clips: [] });
    await admin.agent.post('/api/admin/retention/run').set('x-csrf-token', admin.csrf).send({ projectId }).expect(409);

    const old = new Date(Date.now() - 40 * 24 * 3600_000);
    const file = await makePatternClip(path.join(media, 'rejected.mp4'), 2, 'hue=h=90');
    const rejected = (await insertClip(server, file, projectId, operatorId)).clip;
    const keptFile = await makePatternClip(path.join(media, 'accepted.mp4'), 2, 'hue=h=200');
    const accepted = (await insertClip(server, keptFile, projectId, operatorId)).clip;
    const recentFile = await makePatternClip(path.join(media, 'recent.mp4'), 2, 'hue=h=300');
    const recent = (await insertClip(server, recentFile, projectId, operatorId)).clip;
    await runtime.drain();
    for (const [clip, decision, at] of [
      [rejected, 'reject', old],
      [accepted, 'accept', old],
      [recent, 'reject', new Date()],
    ] as const) {
      await clip.update({ state: decision === 'reject' ? 'rejected' : 'accepted' });
      await Verdict.create({
        clipId: clip.id,
        curatorId: adminId,
        decision,
        reason: decision === 'reject' ? 'blurry' : null,
        reasonLabel: null,
        comment: '',
        bulk: false,
        at,
        supersededAt: null,
        digestId: null,
      } as never);
    }
    await project!.update({ retentionDays: 30 });
    const before = Number((await Clip.findByPk(rejected.id))!.storedBytes);
    const planned = (await preview()).body;
    expect(planned.clips.map((clip: { clipId: number }) => clip.clipId)).toEqual([rejected.id]);
    expect(planned.totalBytes).toBe(before);

    await admin.agent.post('/api/admin/retention/run').set('x-csrf-token', admin.csrf).send({ projectId }).expect(202);
    await runtime.drain();
    const purged = await Clip.findByPk(rejected.id);
    expect(purged!.purgedAt).toBeInstanceOf(Date);
    expect(Number(purged!.storedBytes)).toBe(0);
    expect(fs.existsSync(storagePaths(server.storageDir).clipDir(rejected.id))).toBe(false);
    expect(await Verdict.count({ where: { clipId: rejected.id } })).toBe(1);
    expect((await Clip.findByPk(accepted.id))!.purgedAt).toBeNull();
    expect((await Clip.findByPk(recent.id))!.purgedAt).toBeNull();
    expect(fs.existsSync(storagePaths(server.storageDir).clipDir(accepted.id))).toBe(true);
    expect(await AuditEvent.count({ where: { action: 'clip.purge', targetId: String(rejected.id) } })).toBe(1);
    expect((await preview()).body.clips).toEqual([]);
  });

  it('previews what comes due in the next 7 and 30 days, and each clip moves to due now when its day comes', async () => {
    const project = (await Project.findByPk(projectId))!;
    const recent = (await Clip.findOne({ where: { originalName: 'recent.mp4' } }))!;
    const verdict = (await Verdict.findOne({ where: { clipId: recent.id, supersededAt: null } }))!;
    const bytes = Number(recent.storedBytes);
    const dayMs = 24 * 3600_000;
    await project.update({ retentionDays: 25 });
    const dueAt = new Date(verdict.at.getTime() + 25 * dayMs);

    const today = (await admin.agent.get(`/api/admin/retention/preview?projectId=${projectId}`).expect(200)).body;
    expect(today.clips).toEqual([]);
    expect(today.upcoming).toEqual([
      { clipId: recent.id, originalName: 'recent.mp4', bytes, dueAt: dueAt.toISOString() },
    ]);
    expect(today.windows).toEqual([
      { days: 7, clips: 0, bytes: 0 },
      { days: 30, clips: 1, bytes },
    ]);
    // Twenty days on, it is five days from due: inside both windows.
    const later = await retentionCandidates(projectId, new Date(verdict.at.getTime() + 20 * dayMs));
    expect(later.windows).toEqual([
      { days: 7, clips: 1, bytes },
      { days: 30, clips: 1, bytes },
    ]);
    // On its day it is due now, the same list the run purges, and no longer upcoming.
    const due = await retentionCandidates(projectId, dueAt);
    expect(due.clips.map((clip) => clip.clipId)).toEqual([recent.id]);
    expect(due.upcoming).toEqual([]);
    await project.update({ retentionDays: null });
  });
});

describe('settings', () => {
  it('are admin-only, validated, and apply: new projects take the flag defaults, sessions the lifetime', async () => {
    await request(server.app).get('/api/settings').expect(401);
    await operator.agent.get('/api/settings').expect(403);
    const current = (await admin.agent.get('/api/settings').expect(200)).body;
    expect(current).toMatchObject({ mailFrom: server.config.mailFrom, sessionHours: 12 });
    expect(current.projectFlagDefaults.blurryLaplacianVariance).toBe(100);

    const bad = await admin.agent
      .put('/api/settings')
      .set('x-csrf-token', admin.csrf)
      .send({ ...current, sessionHours: 0 })
      .expect(400);
    expect(bad.body.error.message).toMatch(/^sessionHours/);
    await admin.agent
      .put('/api/settings')
      .set('x-csrf-token', admin.csrf)
      .send({ ...current, mailFrom: 'not an address' })
      .expect(400);

    const saved = await admin.agent
      .put('/api/settings')
      .set('x-csrf-token', admin.csrf)
      .send({
        ...current,
        projectFlagDefaults: { ...current.projectFlagDefaults, blurryLaplacianVariance: 60 },
        mailFrom: 'Orchard team <robots@example.test>',
        sessionHours: 2,
      })
      .expect(200);
    expect(saved.body).toMatchObject({ mailFrom: 'Orchard team <robots@example.test>', sessionHours: 2 });
    const project = await admin.agent
      .post('/api/projects')
      .set('x-csrf-token', admin.csrf)
      .send({ name: 'After the settings change' })
      .expect(201);
    expect(project.body.settings.flagThresholds.blurryLaplacianVariance).toBe(60);
    const me = await admin.agent.get('/api/me').expect(200);
    const cookie = String(me.headers['set-cookie'] ?? '');
    const expires = /Expires=([^;]+)/.exec(cookie)?.[1];
    expect(expires).toBeDefined();
    const hoursLeft = (new Date(expires!).getTime() - Date.now()) / 3600_000;
    expect(hoursLeft).toBeGreaterThan(1.9);
    expect(hoursLeft).toBeLessThan(2.1);
  });
});
