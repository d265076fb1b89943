import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, Project, UploadReservation, User } from '../../server/core/models';
import { cleanStaleUploads } from '../../server/core/usage/storage-hygiene';
import { probeUpload } from '../../server/core/media/clip-probe';
import { storagePaths } from '../../server/core/storage/paths';
import { predictDerivedBytesOf } from '../../server/core/usage/derived-bytes';
import { signInOverHttp } from '../helpers/http-session';
import { makeTestClip } from '../helpers/media-fixtures';
import { addUser, startTestServer, type TestServer } from '../helpers/test-server';

let server: TestServer;
let listener: http.Server;
let baseUrl: string;
let session: { cookie: string; csrf: string };
const media = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-quota-'));
const clips: string[] = [];

beforeAll(async () => {
  server = await startTestServer();
  await addUser(server, 'operator');
  listener = server.app.listen(0, '127.0.0.1');
  await new Promise((resolve) => listener.once('listening', resolve));
  baseUrl = `http://127.0.0.1:${(listener.address() as AddressInfo).port}`;
  session = await signInOverHttp(baseUrl, 'operator@example.test');
  for (let seed = 0; seed < 3; seed += 1) clips.push(await makeTestClip(media, `pass-${seed}.mp4`, { seed }));
}, 120_000);
afterAll(async () => {
  listener.closeAllConnections();
  await new Promise((resolve) => listener.close(resolve));
  await server.close();
  fs.rmSync(media, { recursive: true, force: true });
});

async function newProject(name: string, quotaBytes: number | null) {
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

function multipart(projectId: number, file: string): { body: Buffer; type: string } {
  const boundary = `----kinefold${Math.random().toString(16).slice(2)}`;
  const head =
    `--${boundary}\r\nContent-Disposition: form-data; name="projectId"\r\n\r\n${projectId}\r\n` +
    `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${path.basename(file)}"\r\n` +
    'Content-Type: video/mp4\r\n\r\n';
  const body = Buffer.concat([Buffer.from(head), fs.readFileSync(file), Buffer.from(`\r\n--${boundary}--\r\n`)]);
  return { body, type: `multipart/form-data; boundary=${boundary}` };
}

function post(projectId: number, file: string): Promise<Response> {
  const { body, type } = multipart(projectId, file);
  return fetch(`${baseUrl}/api/clips`, {
    method: 'POST',
    body: new Uint8Array(body),
    headers: { cookie: session.cookie, 'x-csrf-token': session.csrf, 'content-type': type },
  });
}

function incomingFiles(): string[] {
  const dir = storagePaths(server.storageDir).incomingDir;
  return fs.existsSync(dir) ? fs.readdirSync(dir) : [];
}

describe('upload quotas', () => {
  it('lets exactly the one upload that fits land when two race for the last room', async () => {
    // Each clip holds its source and the derived bytes predicted from its probe at the project's settings; the
    // quota has room for one such hold beside the other upload's reservation (its request), not for two holds.
    const files = clips.slice(0, 2);
    const requests = files.map((file) => multipart(0, file).body.length);
    const holds = await Promise.all(
      files.map(async (file) => {
        const { probe } = await probeUpload(file, path.basename(file));
        return fs.statSync(file).size + (await predictDerivedBytesOf(file, probe, { sampleFps: 5, workingSize: 320 }));
      }),
    );
    const project = await newProject('Creek block', Math.max(...holds) + Math.max(...requests) + 100);
    const answers = await Promise.all([post(project.id, clips[0]!), post(project.id, clips[1]!)]);
    const statuses = answers.map((answer) => answer.status).sort();
    expect(statuses).toEqual([201, 413]);
    const refused = answers.find((answer) => answer.status === 413)!;
    expect(((await refused.json()) as { error: { message: string } }).error.message).toMatch(
      /Project "Creek block"'s quota of .* has .* left; this (upload|clip) needs/,
    );
    const used = (await Clip.sum('storedBytes', { where: { projectId: project.id } })) ?? 0;
    expect(Number(used)).toBeLessThanOrEqual(Number(project.quotaBytes));
    expect(await UploadReservation.count()).toBe(0);
    expect(incomingFiles()).toEqual([]);
  });

  it("refuses an upload over the uploader's own quota and says which quota", async () => {
    const project = await newProject('Orchard terraces', null);
    const user = await User.findByEmail('operator@example.test');
    await user!.update({ quotaBytes: 1000 });
    try {
      const answer = await post(project.id, clips[2]!);
      expect(answer.status).toBe(413);
      expect(((await answer.json()) as { error: { message: string } }).error.message).toMatch(/^Your quota of 1000 B/);
    } finally {
      await user!.update({ quotaBytes: null });
    }
  });

  it('deletes the partial file and releases the reservation when the connection is cut mid-way', async () => {
    const project = await newProject('Cut connection', null);
    const before = await Clip.count();
    const { body, type } = multipart(project.id, clips[2]!);
    await new Promise<void>((resolve) => {
      const request = http.request(`${baseUrl}/api/clips`, {
        method: 'POST',
        headers: {
          cookie: session.cookie,
          'x-csrf-token': session.csrf,
          'content-type': type,
          'content-length': body.length,
        },
      });
      request.on('error', () => resolve());
      request.write(body.subarray(0, Math.floor(body.length / 2)));
      setTimeout(() => {
        request.destroy();
        resolve();
      }, 300);
    });
    await expect
      .poll(async () => (await UploadReservation.count()) === 0 && incomingFiles().length === 0, { timeout: 5000 })
      .toBe(true);
    expect(await Clip.count()).toBe(before);
    const health = await fetch(`${baseUrl}/api/health`);
    expect(health.status).toBe(200);
  });

  it('clears partial uploads and reservations left over an hour by a stopped server', async () => {
    const paths = storagePaths(server.storageDir);
    fs.mkdirSync(paths.incomingDir, { recursive: true });
    const stale = path.join(paths.incomingDir, 'left-behind.part');
    fs.writeFileSync(stale, 'partial');
    const twoHoursAgo = new Date(Date.now() - 2 * 3600_000);
    fs.utimesSync(stale, twoHoursAgo, twoHoursAgo);
    const fresh = path.join(paths.incomingDir, 'in-flight.part');
    fs.writeFileSync(fresh, 'partial');
    const user = await User.findByEmail('operator@example.test');
    const project = await newProject('Leftovers', null);
    await UploadReservation.create({ id: 'stale-reservation', projectId: project.id, userId: user!.id, bytes: 5 });
    await UploadReservation.update({ createdAt: twoHoursAgo }, { where: { id: 'stale-reservation' }, silent: true });
    expect(await cleanStaleUploads(paths)).toEqual({ files: 1, reservations: 1 });
    expect(fs.readdirSync(paths.incomingDir)).toEqual(['in-flight.part']);
    fs.rmSync(fresh);
  });
});
