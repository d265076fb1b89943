import fs from 'node:fs';
import type http from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, Project, UploadReservation } from '../../server/core/models';
import { probeUpload } from '../../server/core/media/clip-probe';
import { storagePaths } from '../../server/core/storage/paths';
import { predictDerivedBytesOf } from '../../server/core/usage/derived-bytes';
import { signInOverHttp } from '../helpers/http-session';
import { makeTestClip } from '../helpers/media-fixtures';
import { addUser, startTestServer, type TestServer } from '../helpers/test-server';
import { paddedCopy, postUpload, uploadBody } from '../helpers/upload-over-http';

const SESSIONS = 4;
const UPLOADS = 24;
const FITTING = 10;

let server: TestServer;
let listener: http.Server;
let baseUrl: string;
const sessions: { cookie: string; csrf: string }[] = [];
const files: string[] = [];
const media = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-concurrent-'));

beforeAll(async () => {
  server = await startTestServer();
  listener = server.app.listen(0, '127.0.0.1');
  await new Promise((resolve) => listener.once('listening', resolve));
  baseUrl = `http://127.0.0.1:${(listener.address() as AddressInfo).port}`;
  for (let index = 0; index < SESSIONS; index += 1) {
    const email = `operator-${index}@example.test`;
    await addUser(server, 'operator', email);
    sessions.push(await signInOverHttp(baseUrl, email));
  }
  const clip = await makeTestClip(media, 'base.mp4', { seconds: 1 });
  // 256 KiB each, so the bodies are still arriving while other requests reserve and commit.
  for (let index = 0; index < UPLOADS; index += 1) {
    files.push(paddedCopy(clip, path.join(media, `row-${index}.mp4`), 256 * 1024, index));
  }
}, 120_000);
afterAll(async () => {
  listener.closeAllConnections();
  await new Promise((resolve) => listener.close(resolve));
  await server.close();
  fs.rmSync(media, { recursive: true, force: true });
});

describe('many uploads at once', () => {
  it('answers only 201 or 413 to 24 uploads from 4 sessions, holds the quota with predictions, leaves nothing', async () => {
    // Each admitted clip holds its source and the derived bytes predicted for it; room for ten such holds, while
    // the reservations taken as the bodies arrive (the request's Content-Length) are smaller, so admission must
    // refuse what the reservations let through.
    const { probe } = await probeUpload(files[0]!, 'row.mp4');
    const predicted = await predictDerivedBytesOf(files[0]!, probe, { sampleFps: 5, workingSize: 320 });
    const hold = fs.statSync(files[0]!).size + predicted;
    expect(predicted).toBeGreaterThan(uploadBody(0, files[0]!).body.length);
    const quotaBytes = FITTING * hold + Math.floor(hold / 2);
    const project = await Project.create({
      name: 'Busy week',
      quotaBytes,
      estimator: 'farneback',
      estimatorParams: {},
      sampleFps: 5,
      workingSize: 320,
      deltas: [1],
      flagThresholds: {},
    });
    const answers = await Promise.all(
      files.map((file, index) => postUpload(baseUrl, sessions[index % SESSIONS]!, project.id, file)),
    );
    const statuses = answers.map((answer) => answer.status);
    const bodies = await Promise.all(answers.map((answer) => answer.text()));
    expect(
      statuses.filter((status) => status !== 201 && status !== 413),
      bodies.join('\n'),
    ).toEqual([]);
    const created = statuses.filter((status) => status === 201).length;
    // Reservations may refuse some uploads early while others are still arriving, so ten or fewer land, never more.
    expect(created).toBeGreaterThan(0);
    expect(created).toBeLessThanOrEqual(FITTING);
    const refusals = bodies.filter((_, index) => statuses[index] === 413);
    expect(refusals.some((body) => /a predicted .* of frames, motion fields and preview/.test(body))).toBe(true);
    expect(statuses.filter((status) => status === 413).length).toBe(UPLOADS - created);
    expect(await Clip.count({ where: { projectId: project.id } })).toBe(created);
    const stored = Number((await Clip.sum('storedBytes', { where: { projectId: project.id } })) ?? 0);
    expect(stored).toBeLessThanOrEqual(quotaBytes);
    expect(stored).toBe(created * hold);
    expect(await UploadReservation.count()).toBe(0);
    const incoming = storagePaths(server.storageDir).incomingDir;
    expect(fs.existsSync(incoming) ? fs.readdirSync(incoming) : []).toEqual([]);
  }, 120_000);
});
