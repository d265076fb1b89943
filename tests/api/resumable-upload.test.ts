import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Response } from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, Project, UploadReservation } from '../../server/core/models';
import { storagePaths } from '../../server/core/storage/paths';
import { cleanStaleUploads, expireResumableUploads } from '../../server/core/usage/storage-hygiene';
import { makeTestClip } from '../helpers/media-fixtures';
import {
  addUser,
  agentWithCsrf,
  appWith,
  signedInAgent,
  startTestServer,
  type TestServer,
} from '../helpers/test-server';

// The tus 1.0.0 protocol (tus.io/protocols/resumable-upload): POST with Upload-Length creates, HEAD answers
// Upload-Offset, PATCH with Content-Type application/offset+octet-stream appends from that offset, and a PATCH at
// the wrong offset gets 409; DELETE is the termination extension.
const TUS = { 'Tus-Resumable': '1.0.0' };
const ROUTE = '/api/clips/resumable';

let server: TestServer;
type Sender = Awaited<ReturnType<typeof agentWithCsrf>>;
let operator: Sender;
let otherOperator: Sender;
let project: Project;
const media = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-resumable-'));
const clips: Buffer[] = [];
let paths: ReturnType<typeof storagePaths>;

beforeAll(async () => {
  server = await startTestServer();
  paths = storagePaths(server.storageDir);
  await addUser(server, 'operator');
  await addUser(server, 'operator', 'second-operator@example.test');
  await addUser(server, 'curator');
  operator = await signedInAgent(server, 'operator@example.test');
  otherOperator = await signedInAgent(server, 'second-operator@example.test');
  project = await newProject('Terrace rows', null);
  for (let seed = 0; seed < 4; seed += 1) {
    clips.push(fs.readFileSync(await makeTestClip(media, `row-${seed}.mp4`, { seed: seed + 11 })));
  }
}, 120_000);
afterAll(async () => {
  await server.close();
  fs.rmSync(media, { recursive: true, force: true });
});

function newProject(name: string, quotaBytes: number | null) {
  return Project.create({
    name,
    quotaBytes,
    estimator: 'farneback',
    estimatorParams: {},
    sampleFps: 5,
    workingSize: 320,
    deltas: [1],
    flagThresholds: {},
  });
}

/** tus Upload-Metadata: comma-separated `key base64(value)` pairs. */
function metadata(values: Record<string, string>): string {
  return Object.entries(values)
    .map(([key, value]) => `${key} ${Buffer.from(value).toString('base64')}`)
    .join(',');
}

function create(who: Sender, length: number, values: Record<string, string>) {
  return who.agent
    .post(ROUTE)
    .set(TUS)
    .set('x-csrf-token', who.csrf)
    .set('Upload-Length', String(length))
    .set('Upload-Metadata', metadata(values));
}

function patch(who: Sender, location: string, offset: number, bytes: Buffer) {
  return who.agent
    .patch(location)
    .set(TUS)
    .set('x-csrf-token', who.csrf)
    .set('Upload-Offset', String(offset))
    .set('Content-Type', 'application/offset+octet-stream')
    .send(bytes);
}

function head(who: Sender, location: string) {
  return who.agent.head(location).set(TUS);
}

/** The JSON error body; tus answers errors as text, and Kinefold's are JSON in it. */
function errorOf(answer: Response): { code: string; message: string } {
  return (JSON.parse(answer.text) as { error: { code: string; message: string } }).error;
}

const sha256 = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex');
const resumableFiles = () => (fs.existsSync(paths.resumableDir) ? fs.readdirSync(paths.resumableDir) : []);

describe('resumable uploads (tus)', () => {
  it('refuses the signed-out (401) and other roles (403)', async () => {
    const signedOut = await create(await agentWithCsrf(server), 10, { projectId: String(project.id) });
    expect(signedOut.status).toBe(401);
    const curator = await signedInAgent(server, 'curator@example.test');
    const refused = await create(curator, 10, { projectId: String(project.id) });
    expect(refused.status).toBe(403);
    expect(await UploadReservation.count()).toBe(0);
  });

  it('takes a file in two PATCHes, answers HEAD with the offset, refuses a wrong offset and admits the clip', async () => {
    const file = clips[0]!;
    const created = await create(operator, file.length, {
      projectId: String(project.id),
      filename: 'row-a.mp4',
      site: 'Upper terrace',
      tags: 'rows,dawn',
    });
    expect(created.status).toBe(201);
    const location = created.headers.location!;
    expect(location).toMatch(new RegExp(`^${ROUTE}/[0-9a-f-]{36}$`));
    const uploadId = location.split('/').pop()!;
    // The whole declared length is held against the quotas from creation on.
    expect(Number((await UploadReservation.findByPk(uploadId))!.bytes)).toBe(file.length);

    expect((await head(operator, location)).headers['upload-offset']).toBe('0');
    const half = Math.floor(file.length / 2);
    const first = await patch(operator, location, 0, file.subarray(0, half));
    expect(first.status).toBe(204);
    expect(first.headers['upload-offset']).toBe(String(half));
    const asked = await head(operator, location);
    expect(asked.headers['upload-offset']).toBe(String(half));
    expect(asked.headers['upload-length']).toBe(String(file.length));

    // Someone else cannot see or continue it.
    expect((await head(otherOperator, location)).status).toBe(404);
    expect((await patch(otherOperator, location, half, file.subarray(half))).status).toBe(404);
    // Bytes sent for an offset the server does not hold are refused (tus: 409 Conflict).
    expect((await patch(operator, location, 0, file.subarray(0, 10))).status).toBe(409);

    const last = await patch(operator, location, half, file.subarray(half));
    expect(last.status).toBe(200);
    const clip = JSON.parse(last.text) as { id: number; originalName: string; state: string };
    expect(clip).toMatchObject({ originalName: 'row-a.mp4', state: 'queued' });
    const row = await Clip.findByPk(clip.id);
    expect(row!.sha256).toBe(sha256(file));
    expect(row!.site).toBe('Upper terrace');
    expect(row!.tags).toEqual(['rows', 'dawn']);
    expect(fs.readFileSync(paths.clipSource(clip.id, row!.sourceExt)).equals(file)).toBe(true);
    expect(await UploadReservation.findByPk(uploadId)).toBeNull();
    expect(resumableFiles()).toEqual([]);
    expect((await head(operator, location)).status).toBe(404);
  });

  it('resumes on a restarted server from the offset kept on disk', async () => {
    const file = clips[1]!;
    const created = await create(operator, file.length, { projectId: String(project.id), filename: 'row-b.mp4' });
    const location = created.headers.location!;
    const third = Math.floor(file.length / 3);
    await patch(operator, location, 0, file.subarray(0, third)).expect(204);

    const restarted = appWith(server, {});
    try {
      const again = await signedInAgent(restarted, 'operator@example.test');
      const offset = Number((await head(again, location)).headers['upload-offset']);
      expect(offset).toBe(third);
      const last = await patch(again, location, offset, file.subarray(offset));
      expect(last.status).toBe(200);
      const clip = JSON.parse(last.text) as { id: number };
      expect((await Clip.findByPk(clip.id))!.sha256).toBe(sha256(file));
    } finally {
      restarted.close();
    }
  });

  it('refuses bad metadata (400), an undeclared length (411) and a file over the limit (413) before any byte', async () => {
    const missing = await create(operator, 100, { site: 'no project' });
    expect(missing.status).toBe(400);
    expect(errorOf(missing).message).toMatch(/^projectId:/);
    const unknown = await create(operator, 100, { projectId: String(project.id), colour: 'teal' });
    expect(unknown.status).toBe(400);
    expect(errorOf(unknown).code).toBe('invalid_input');
    const badTime = await create(operator, 100, { projectId: String(project.id), capturedAt: 'yesterday' });
    expect(errorOf(badTime).message).toMatch(/capturedAt must be an ISO 8601 time with a time zone/);

    const deferred = await operator.agent
      .post(ROUTE)
      .set(TUS)
      .set('x-csrf-token', operator.csrf)
      .set('Upload-Defer-Length', '1')
      .set('Upload-Metadata', metadata({ projectId: String(project.id) }));
    expect(deferred.status).toBe(411);
    expect(errorOf(deferred).code).toBe('length_required');

    const small = appWith(server, { uploadLimitBytes: 1000 });
    try {
      const limited = await signedInAgent(small, 'operator@example.test');
      const tooBig = await create(limited, 5000, { projectId: String(project.id) });
      expect(tooBig.status).toBe(413);
      expect(errorOf(tooBig)).toMatchObject({ code: 'file_too_large' });
      expect(errorOf(tooBig).message).toMatch(/files up to 1000 B are accepted/);
    } finally {
      small.close();
    }
    expect(await UploadReservation.count()).toBe(0);
    expect(resumableFiles()).toEqual([]);
  });

  it('refuses an upload over the project quota (413) at creation, and a project that does not exist (404)', async () => {
    const tight = await newProject('Tight quota', 1000);
    const refused = await create(operator, 5000, { projectId: String(tight.id) });
    expect(refused.status).toBe(413);
    expect(errorOf(refused)).toMatchObject({ code: 'quota_exceeded' });
    expect(errorOf(refused).message).toMatch(/Project "Tight quota"'s quota of 1000 B has 1000 B left/);
    expect((await create(operator, 10, { projectId: '99999' })).status).toBe(404);
    expect(await UploadReservation.count()).toBe(0);
    expect(resumableFiles()).toEqual([]);
  });

  it('refuses a duplicate (409) and an unprobeable file (422) once complete, leaving nothing behind', async () => {
    const file = clips[0]!;
    const created = await create(operator, file.length, { projectId: String(project.id), filename: 'again.mp4' });
    const duplicate = await patch(operator, created.headers.location!, 0, file);
    expect(duplicate.status).toBe(409);
    expect(errorOf(duplicate).code).toBe('duplicate_clip');
    expect(errorOf(duplicate).message).toMatch(/^again\.mp4 is already in this project as clip \d+ \("row-a\.mp4"\)/);

    const text = Buffer.from('Irrigation check at bench 4.\n');
    const notes = await create(operator, text.length, { projectId: String(project.id), filename: 'notes.txt' });
    const refused = await patch(operator, notes.headers.location!, 0, text);
    expect(refused.status).toBe(422);
    expect(errorOf(refused).message).toMatch(/notes\.txt is not a video file/);

    const empty = await create(operator, 0, { projectId: String(project.id), filename: 'empty.mp4' });
    expect(empty.status).toBe(422);
    expect(errorOf(empty).message).toBe('empty.mp4 is empty (0 bytes).');

    expect(await UploadReservation.count()).toBe(0);
    expect(resumableFiles()).toEqual([]);
    expect((await head(operator, created.headers.location!)).status).toBe(404);
  });

  it('gives the reservation and the partial file back when the sender cancels (DELETE)', async () => {
    const file = clips[2]!;
    const created = await create(operator, file.length, { projectId: String(project.id), filename: 'row-c.mp4' });
    const location = created.headers.location!;
    await patch(operator, location, 0, file.subarray(0, 100)).expect(204);
    expect(await UploadReservation.count()).toBe(1);
    expect((await otherOperator.agent.delete(location).set(TUS).set('x-csrf-token', otherOperator.csrf)).status).toBe(
      404,
    );
    const cancelled = await operator.agent.delete(location).set(TUS).set('x-csrf-token', operator.csrf);
    expect(cancelled.status).toBe(204);
    expect(await UploadReservation.count()).toBe(0);
    expect(resumableFiles()).toEqual([]);
  });

  it('keeps resumable uploads over a restart clean-up, and expires those idle too long', async () => {
    const file = clips[3]!;
    const idle = await create(operator, file.length, { projectId: String(project.id), filename: 'idle.mp4' });
    await patch(operator, idle.headers.location!, 0, file.subarray(0, 200)).expect(204);
    const active = await create(operator, file.length, { projectId: String(project.id), filename: 'active.mp4' });
    await patch(operator, active.headers.location!, 0, file.subarray(0, 300)).expect(204);
    const idleId = idle.headers.location!.split('/').pop()!;
    const activeId = active.headers.location!.split('/').pop()!;

    // What a start of the server runs: multipart leftovers go, resumable uploads and their reservations stay.
    expect(await cleanStaleUploads(paths, { before: Date.now() + 1000 })).toEqual({ files: 0, reservations: 0 });
    expect(await UploadReservation.count()).toBe(2);

    const dayAgo = new Date(Date.now() - 25 * 3600_000);
    for (const file of [paths.resumableFile(idleId), paths.resumableInfo(idleId)]) fs.utimesSync(file, dayAgo, dayAgo);
    expect(await expireResumableUploads(paths, { idleMs: 24 * 3600_000 })).toEqual({ uploads: 1 });
    expect(await UploadReservation.findByPk(idleId)).toBeNull();
    expect(await UploadReservation.findByPk(activeId)).not.toBeNull();
    expect(resumableFiles().sort()).toEqual([activeId, `${activeId}.json`].sort());
    expect((await head(operator, idle.headers.location!)).status).toBe(404);

    const offset = Number((await head(operator, active.headers.location!)).headers['upload-offset']);
    expect(offset).toBe(300);
    await operator.agent.delete(active.headers.location!).set(TUS).set('x-csrf-token', operator.csrf).expect(204);
  });
});
