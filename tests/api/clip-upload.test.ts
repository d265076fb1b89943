import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { Clip, Job, Project, UploadReservation } from '../../server/core/models';
import { storagePaths } from '../../server/core/storage/paths';
import {
  makeAudioOnly,
  makeOnePixelClip,
  makeStillImage,
  makeTestClip,
  makeTruncatedClip,
} from '../helpers/media-fixtures';
import { addUser, appWith, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

let server: TestServer;
let operator: Awaited<ReturnType<typeof signedInAgent>>;
let projectId: number;
const media = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-media-'));
const files: Record<string, string> = {};

beforeAll(async () => {
  server = await startTestServer();
  await addUser(server, 'operator');
  await addUser(server, 'curator');
  operator = await signedInAgent(server, 'operator@example.test');
  projectId = (
    await Project.create({
      name: 'Glasshouse',
      estimator: 'farneback',
      estimatorParams: {},
      sampleFps: 5,
      workingSize: 320,
      deltas: [1, 2],
      flagThresholds: {},
    })
  ).id;
  files.good = await makeTestClip(media, 'row-07.mp4', { seed: 1 });
  files.second = await makeTestClip(media, 'row-08.mp4', { seed: 2 });
  files.third = await makeTestClip(media, 'row-09.mp4', { seed: 3 });
  files.audio = await makeAudioOnly(media);
  files.still = await makeStillImage(media);
  files.onePixel = await makeOnePixelClip(media);
  files.truncated = await makeTruncatedClip(media);
  files.text = path.join(media, 'report.mp4');
  fs.writeFileSync(files.text, 'Field report: nothing to see here.\n'.repeat(40));
  files.empty = path.join(media, 'empty.mp4');
  fs.writeFileSync(files.empty, '');
}, 120_000);
afterAll(async () => {
  await server.close();
  fs.rmSync(media, { recursive: true, force: true });
});

/** Paths, tool names and the addresses ffmpeg prints (`[mov,mp4 @ 0x…]`) must never reach the operator. */
const INTERNALS = /\/|\\|ffprobe|ffmpeg|@ 0x|moov|\.part\b|incoming/i;

type SignedIn = Awaited<ReturnType<typeof signedInAgent>>;

function upload(file: string, fields: Record<string, string> = {}, filename?: string, as: SignedIn = operator) {
  let req = as.agent.post('/api/clips').set('x-csrf-token', as.csrf);
  for (const [key, value] of Object.entries({ projectId: String(projectId), ...fields })) req = req.field(key, value);
  return req.attach('file', file, { filename: filename ?? path.basename(file) });
}

/** Nothing of a refused upload may stay behind: no rows, no reservation, no file in incoming/. */
async function expectNothingLeft(clipsBefore: number): Promise<void> {
  expect(await Clip.count()).toBe(clipsBefore);
  expect(await Job.count()).toBe(clipsBefore);
  expect(await UploadReservation.count()).toBe(0);
  const incoming = storagePaths(server.storageDir).incomingDir;
  expect(fs.existsSync(incoming) ? fs.readdirSync(incoming) : []).toEqual([]);
}

describe('POST /api/clips', () => {
  it('is 401 signed out and 403 for a curator', async () => {
    const curator = await signedInAgent(server, 'curator@example.test');
    await curator.agent
      .post('/api/clips')
      .set('x-csrf-token', curator.csrf)
      .field('projectId', String(projectId))
      .attach('file', files.good)
      .expect(403);
  });

  it('creates a queued clip with probe data and capture metadata, its job, and the file in place', async () => {
    const response = await upload(files.good, {
      site: 'Terrace north',
      rig: 'tractor mount',
      capturedAt: '2026-04-03T09:15:00+02:00',
      tags: 'rows, Morning ,rows',
      notes: 'first pass',
    }).expect(201);
    const clip = response.body;
    expect(clip).toMatchObject({
      state: 'queued',
      originalName: 'row-07.mp4',
      site: 'Terrace north',
      rig: 'tractor mount',
      capturedAt: '2026-04-03T07:15:00.000Z',
      tags: ['rows', 'morning'],
      notes: 'first pass',
      projectName: 'Glasshouse',
      probe: { codec: 'h264', width: 160, height: 120, fps: 25 },
    });
    expect(clip.probe.durationS).toBeCloseTo(2, 1);
    expect(clip.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(clip.sizeBytes).toBe(fs.statSync(files.good).size);
    expect(fs.readFileSync(storagePaths(server.storageDir).clipSource(clip.id, 'mp4'))).toEqual(
      fs.readFileSync(files.good),
    );
    const job = await Job.findOne({ where: { clipId: clip.id } });
    expect(job).toMatchObject({ kind: 'process-clip', state: 'queued' });
    expect(await UploadReservation.count()).toBe(0);
  });

  it('answers 409 naming the existing clip for an exact duplicate, leaving nothing behind', async () => {
    const before = await Clip.count();
    const response = await upload(files.good, {}, 'copy-of-row-07.mp4').expect(409);
    expect(response.body.error.message).toMatch(/already in this project as clip \d+ \("row-07.mp4"\)/);
    await expectNothingLeft(before);
  });

  const refusals: [string, keyof typeof files, RegExp][] = [
    ['a zero-byte file', 'empty', /empty\.mp4 is empty/],
    ['a text file renamed .mp4', 'text', /report\.mp4 is not a video file/],
    ['an image file', 'still', /still\.png is a still image, not a video/],
    ['an audio-only file', 'audio', /voice-note\.m4a holds only sound: it has no video stream/],
    ['the first half of a real MP4', 'truncated', /cut-short\.mp4 is damaged or incomplete/],
    ['a 1×1 px video', 'onePixel', /1×1 px; Kinefold takes videos between 16 and 8192 px/],
  ];
  for (const [what, key, message] of refusals) {
    it(`refuses ${what} with 422 and a plain message, leaving nothing behind`, async () => {
      const before = await Clip.count();
      const response = await upload(files[key]!).expect(422);
      expect(response.body.error.message).toMatch(message);
      expect(response.body.error.message).not.toMatch(INTERNALS);
      await expectNothingLeft(before);
    });
  }

  it('logs what the tools said, with the request id, and sends none of it', async () => {
    const warn = vi.spyOn(console, 'warn').mockImplementation(() => undefined);
    try {
      const response = await upload(files.truncated!).expect(422);
      expect(JSON.stringify(response.body)).not.toMatch(INTERNALS);
      const logged = warn.mock.calls.map((call) => call.map(String).join(' ')).join('\n');
      expect(logged).toContain(response.headers['x-request-id']);
      expect(logged).toMatch(/moov atom not found/);
    } finally {
      warn.mockRestore();
    }
  });

  it('keeps a hostile file name as data only', async () => {
    const hostile = `../../etc/${'\u0007'}passwd/${'片'.repeat(300)}.mp4`;
    const response = await upload(files.second, {}, hostile).expect(201);
    // The bell character (U+0007) stands for any control character a file name may carry.
    expect(response.body.originalName).not.toContain('\u0007');
    expect(response.body.originalName).not.toMatch(/[/\\]/);
    expect([...response.body.originalName].length).toBeLessThanOrEqual(255);
    expect(fs.readdirSync(storagePaths(server.storageDir).clipDir(response.body.id))).toEqual(['source.mp4']);
    await operator.agent.delete(`/api/clips/${response.body.id}`).set('x-csrf-token', operator.csrf).expect(204);
  });

  it('refuses bad metadata with 400 naming the field', async () => {
    const before = await Clip.count();
    const cases: [Record<string, string>, RegExp][] = [
      [{ capturedAt: 'last tuesday' }, /^capturedAt/],
      [{ capturedAt: '2026-04-03T09:15:00' }, /^capturedAt: .*time zone/],
      [{ tags: Array.from({ length: 200 }, (_, i) => `t${i}`).join(',') }, /^tags/],
      [{ colour: 'red' }, /colour/],
    ];
    for (const [fields, message] of cases) {
      const response = await upload(files.third, fields).expect(400);
      expect(response.body.error.message).toMatch(message);
    }
    await expectNothingLeft(before);
  });

  it('answers 404 for an unknown project and 409 for an archived one', async () => {
    const before = await Clip.count();
    const unknown = await upload(files.third, { projectId: '999' }).expect(404);
    expect(unknown.body.error.message).toMatch(/Project 999 not found/);
    const archived = await Project.create({
      name: 'Old creek block',
      archived: true,
      estimator: 'farneback',
      estimatorParams: {},
      sampleFps: 5,
      workingSize: 320,
      deltas: [1],
      flagThresholds: {},
    });
    const response = await upload(files.third, { projectId: String(archived.id) }).expect(409);
    expect(response.body.error.message).toMatch(/archived and takes no uploads/);
    await expectNothingLeft(before);
  });

  it('answers 413 for a file over the size limit, leaving nothing behind', async () => {
    const before = await Clip.count();
    const small = appWith(server, { uploadLimitBytes: 4096 });
    try {
      const response = await upload(
        files.good,
        {},
        undefined,
        await signedInAgent(small, 'operator@example.test'),
      ).expect(413);
      expect(response.body.error.message).toMatch(/files up to 4\.0 KiB are accepted/);
    } finally {
      small.close();
    }
    await expectNothingLeft(before);
  });
});
