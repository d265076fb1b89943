import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Job, Pairset, Shard, User } from '../../server/core/models';
import { storagePaths } from '../../server/core/storage/paths';
import { addPairsetClip } from '../helpers/pairset-clips';
import { addProject } from '../helpers/pipeline-clips';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { addUser, agentWithCsrf, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';
import { binary } from '../helpers/binary-body';

let server: TestServer;
let runtime: TestRuntime;
let projectId: number;
type Agent = Awaited<ReturnType<typeof signedInAgent>>;
const agents = {} as Record<'operator' | 'curator' | 'engineer' | 'other' | 'admin', Agent>;
/** A pairset built in beforeAll, owned by the engineer. */
let builtId: number;
const FRAMES = 10;
const CLIPS = 3;

const definition = (fields: Record<string, unknown> = {}) => ({
  name: 'rows and shade',
  projectIds: [projectId],
  views: ['frame', 'neighbour', 'motion'],
  deltas: [1, 2],
  graph: 'core',
  split: { val: 0.3, seed: 5 },
  ...fields,
});

function post(who: Agent, url: string, body?: object) {
  return who.agent.post(url).set('x-csrf-token', who.csrf).send(body);
}

async function createDraft(who: Agent, fields: Record<string, unknown>) {
  const response = await post(who, '/api/pairsets', definition(fields)).expect(201);
  return response.body.id as number;
}

beforeAll(async () => {
  server = await startTestServer();
  runtime = startTestRuntime(server);
  await addUser(server, 'operator');
  await addUser(server, 'curator');
  await addUser(server, 'engineer');
  await addUser(server, 'engineer', 'other@example.test');
  const admin = await addUser(server, 'admin');
  projectId = (await addProject(admin.id, 'orchard')).id;
  for (let seed = 0; seed < CLIPS; seed += 1) {
    const site = seed ? 'Hill' : 'Dell';
    await addPairsetClip(server, { projectId, uploaderId: admin.id, frames: FRAMES, seed, site });
  }
  await addPairsetClip(server, { projectId, uploaderId: admin.id, frames: FRAMES, seed: 7, state: 'awaiting_review' });
  for (const role of ['operator', 'curator', 'engineer', 'admin'] as const) {
    agents[role] = await signedInAgent(server, `${role}@example.test`);
  }
  agents.other = await signedInAgent(server, 'other@example.test');
  builtId = await createDraft(agents.engineer, { name: 'built once', shardMB: 0.1 });
  await post(agents.engineer, `/api/pairsets/${builtId}/build`).expect(202);
  await runtime.drain();
});
afterAll(async () => {
  await runtime?.close();
  await server?.close();
});

describe('who may use the pairset routes', () => {
  const routes = (): [string, string, object?][] => [
    ['post', '/api/pairsets', definition({ name: 'role matrix' })],
    ['post', '/api/pairsets/preview', definition()],
    ['get', '/api/pairsets'],
    ['get', `/api/pairsets/${builtId}`],
    ['post', `/api/pairsets/${builtId}/build`],
    ['post', `/api/pairsets/${builtId}/cancel`],
    ['post', `/api/pairsets/${builtId}/new-version`],
    ['delete', '/api/pairsets/987654'],
    ['get', `/api/pairsets/${builtId}/manifest`],
    ['get', `/api/pairsets/${builtId}/shards/0`],
    ['get', `/api/pairsets/${builtId}/difficulty`],
  ];

  it('answer 401 signed out', async () => {
    const { agent, csrf } = await agentWithCsrf(server);
    for (const [method, url, body] of routes()) {
      const response = await agent[method as 'get'](url).set('x-csrf-token', csrf).send(body);
      expect([url, response.status]).toEqual([url, 401]);
    }
  });

  it('answer 403 to operators and curators', async () => {
    for (const role of ['operator', 'curator'] as const) {
      for (const [method, url, body] of routes()) {
        const { agent, csrf } = agents[role];
        const response = await agent[method as 'get'](url).set('x-csrf-token', csrf).send(body);
        expect([role, url, response.status]).toEqual([role, url, 403]);
      }
    }
  });

  it('let engineers and admins through', async () => {
    for (const role of ['engineer', 'admin'] as const) {
      for (const [method, url, body] of routes()) {
        const payload = url === '/api/pairsets' ? { ...body, name: `role matrix ${role}` } : body;
        const response = await agents[role].agent[method as 'get'](url)
          .set('x-csrf-token', agents[role].csrf)
          .send(payload);
        expect([role, url, [401, 403].includes(response.status)]).toEqual([role, url, false]);
      }
    }
  });
});

describe('POST /api/pairsets', () => {
  it('refuses bad definitions with 400 naming the field', async () => {
    const cases: [Record<string, unknown>, string][] = [
      [{ name: '' }, 'name'],
      [{ projectIds: [] }, 'projectIds'],
      [{ views: ['frame'], deltas: [] }, 'views'],
      [{ views: ['frame', 'neighbour'], deltas: [] }, 'deltas'],
      [{ views: ['frame', 'x-ray'] }, 'views'],
      [{ deltas: [1, 1] }, 'deltas'],
      [{ graph: 'star' }, 'graph'],
      [{ coreView: 'luma' }, 'coreView'],
      [{ graph: 'full', coreView: 'frame' }, 'coreView'],
      [{ minConsistentShare: 1.5 }, 'minConsistentShare'],
      [{ outputSize: 8 }, 'outputSize'],
      [{ motionFormat: 'jpeg' }, 'motionFormat'],
      [{ split: { val: 2, seed: 1 } }, 'split.val'],
      [{ split: { val: 0.1 } }, 'split.seed'],
      [{ shardMB: 0 }, 'shardMB'],
      [{ temperature: 0 }, 'temperature'],
      [{ capturedFrom: '2026-04-03' }, 'capturedFrom'],
      [{ capturedFrom: '2026-05-01T00:00:00Z', capturedTo: '2026-04-01T00:00:00Z' }, 'capturedTo'],
      [{ colour: 'red' }, 'colour'],
    ];
    for (const [fields, field] of cases) {
      const response = await post(agents.engineer, '/api/pairsets', definition(fields)).expect(400);
      expect([field, response.body.error.message]).toEqual([field, expect.stringMatching(new RegExp(`^${field}`))]);
    }
  });

  it('creates a draft with defaults filled in, owned by its author, and records it', async () => {
    const response = await post(agents.engineer, '/api/pairsets', definition({ name: 'spring rows' })).expect(201);
    expect(response.body).toMatchObject({
      name: 'spring rows',
      version: 1,
      state: 'draft',
      progress: 0,
      bytes: 0,
      seed: 5,
      shards: [],
      stats: null,
      ownerName: 'Test engineer',
      definition: { motionFormat: 'flo', shardMB: 256, temperature: 0.07, deltas: [1, 2], graph: 'core' },
    });
    const row = (await Pairset.findByPk(response.body.id))!;
    expect(row.ownerId).toBe((await User.findByEmail('engineer@example.test'))!.id);
    expect(await AuditEvent.count({ where: { action: 'pairset.create', targetId: String(row.id) } })).toBe(1);
  });

  it('is 409 for a name in use and 404 for an unknown project', async () => {
    const taken = await post(agents.engineer, '/api/pairsets', definition({ name: 'spring rows' })).expect(409);
    expect(taken.body.error.message).toMatch(/new version/);
    const unknown = await post(agents.engineer, '/api/pairsets', definition({ name: 'x', projectIds: [4242] }));
    expect(unknown.status).toBe(404);
  });
});

describe('POST /api/pairsets/preview', () => {
  const preview = async (fields: Record<string, unknown>) =>
    (await post(agents.engineer, '/api/pairsets/preview', definition({ name: undefined, ...fields })).expect(200)).body;
  const kinds = (body: { kinds: { kind: string; total: number }[] }) =>
    Object.fromEntries(body.kinds.map((kind) => [kind.kind, kind.total]));

  it('counts n − 1 view pairs per moment for the core graph and n(n − 1)/2 for the full graph', async () => {
    // Core and full graphs of Tian, Krishnan & Isola 2019 (Contrastive Multiview Coding). With 3 accepted clips
    // of 10 frames and no cuts, frame/luma/chroma pairs exist at all 10 moments, motion pairs at the 9 with a field.
    const all = CLIPS * FRAMES;
    const withField = CLIPS * (FRAMES - 1);
    const three = { views: ['frame', 'luma', 'chroma'], deltas: [] };
    expect(kinds(await preview({ ...three, graph: 'core' }))).toEqual({ 'frame~luma': all, 'frame~chroma': all });
    expect(kinds(await preview({ ...three, graph: 'full' }))).toEqual({
      'frame~luma': all,
      'frame~chroma': all,
      'luma~chroma': all,
    });
    const four = { views: ['frame', 'luma', 'chroma', 'motion'], deltas: [] };
    const core = await preview({ ...four, graph: 'core' });
    expect(kinds(core)).toEqual({ 'frame~luma': all, 'frame~chroma': all, 'frame~motion': withField });
    const full = await preview({ ...four, graph: 'full' });
    expect(kinds(full)).toEqual({
      'frame~luma': all,
      'frame~chroma': all,
      'frame~motion': withField,
      'luma~chroma': all,
      'luma~motion': withField,
      'chroma~motion': withField,
    });
    expect(full.pairs.total).toBe(3 * all + 3 * withField);
    expect(full.views).toEqual(['frame', 'luma', 'chroma', 'motion']);
    expect(core.clips.total).toBe(CLIPS);
    expect(core.clips.train + core.clips.val).toBe(CLIPS);
    expect(core.footageHours.total).toBeCloseTo((CLIPS * FRAMES) / 5 / 3600, 12);
  });

  it('applies the motion filters to every pair of a moment, and the core view choice', async () => {
    // The fixture's field t→t+1 has a mean of 1 + t/100 px: at least 1.05 leaves t = 5…8 in each clip.
    const filtered = await preview({ views: ['frame', 'luma'], deltas: [], minMeanMotion: 1.05 });
    expect(kinds(filtered)).toEqual({ 'frame~luma': CLIPS * 4 });
    const byLuma = await preview({ views: ['frame', 'luma', 'chroma'], deltas: [], coreView: 'luma' });
    expect(Object.keys(kinds(byLuma))).toEqual(['luma~frame', 'luma~chroma']);
    const none = await preview({ views: ['frame', 'luma'], deltas: [], minConsistentShare: 0.95 });
    expect(none.pairs.total).toBe(0);
  });

  it('refuses a bad body with 400 like the definition itself', async () => {
    const response = await post(agents.engineer, '/api/pairsets/preview', { views: ['frame'] }).expect(400);
    expect(response.body.error.message).toMatch(/^projectIds/);
  });
});

describe('GET /api/pairsets and /api/pairsets/:id', () => {
  it('lists pairsets with filters, paging and sorting', async () => {
    const all = await agents.other.agent.get('/api/pairsets').expect(200);
    expect(all.body.total).toBeGreaterThanOrEqual(2);
    const built = await agents.other.agent.get('/api/pairsets?state=built').expect(200);
    expect(built.body.items.map((item: { id: number }) => item.id)).toContain(builtId);
    expect(built.body.items.every((item: { state: string }) => item.state === 'built')).toBe(true);
    const named = await agents.other.agent.get('/api/pairsets?q=built%20once&sort=createdAt').expect(200);
    expect(named.body.items.every((item: { name: string }) => item.name === 'built once')).toBe(true);
    expect(named.body.items[0]).toMatchObject({ id: builtId, version: 1, state: 'built' });
    expect(named.body.items[0].shardCount).toBeGreaterThan(1);
    const paged = await agents.other.agent.get('/api/pairsets?pageSize=1&page=2').expect(200);
    expect(paged.body).toMatchObject({ page: 2, pageSize: 1, total: all.body.total });
    expect(paged.body.items).toHaveLength(1);
    expect((await agents.other.agent.get('/api/pairsets?sort=colour').expect(400)).body.error.message).toMatch(/^sort/);
    expect((await agents.other.agent.get('/api/pairsets?state=done').expect(400)).body.error.message).toMatch(/^state/);
  });

  it('shows a built pairset with its state, statistics and shards to every engineer', async () => {
    const { body } = await agents.other.agent.get(`/api/pairsets/${builtId}`).expect(200);
    expect(body).toMatchObject({ state: 'built', progress: 1, hasDifficulty: true });
    expect(body.shards.length).toBe(body.shardCount);
    expect(body.stats.pairs.total).toBe(body.pairCount);
    expect(body.bytes).toBeGreaterThan(body.shards.reduce((sum: number, s: { bytes: number }) => sum + s.bytes, 0));
    await agents.other.agent.get('/api/pairsets/987654').expect(404);
    expect((await agents.other.agent.get('/api/pairsets/abc').expect(400)).body.error.message).toMatch(/^id/);
  });
});

describe('building, cancelling and versions', () => {
  it('queues a build with 202 and refuses a second one while it runs', async () => {
    const id = await createDraft(agents.engineer, { name: 'queued build' });
    const response = await post(agents.engineer, `/api/pairsets/${id}/build`).expect(202);
    expect(response.body).toMatchObject({ state: 'building', progress: 0 });
    expect(await Job.findOne({ where: { pairsetId: id } })).toMatchObject({ kind: 'build-pairset', state: 'queued' });
    const again = await post(agents.engineer, `/api/pairsets/${id}/build`).expect(409);
    expect(again.body.error.code).toBe('build_running');
    const cancelled = await post(agents.engineer, `/api/pairsets/${id}/cancel`).expect(200);
    expect(cancelled.body.state).toBe('cancelled');
    expect(await Job.findOne({ where: { pairsetId: id } })).toMatchObject({ state: 'cancelled' });
    const twice = await post(agents.engineer, `/api/pairsets/${id}/cancel`).expect(409);
    expect(twice.body.error.code).toBe('not_building');
    expect(await runtime.drain()).toBe(0);
  });

  it('keeps building, cancelling and deleting to the owner (and admins)', async () => {
    const id = await createDraft(agents.engineer, { name: 'not yours' });
    expect((await post(agents.other, `/api/pairsets/${id}/build`).expect(403)).body.error.code).toBe('not_owner');
    await agents.other.agent.delete(`/api/pairsets/${id}`).set('x-csrf-token', agents.other.csrf).expect(403);
    await post(agents.admin, `/api/pairsets/${id}/build`).expect(202);
    await post(agents.other, `/api/pairsets/${id}/cancel`).expect(403);
    await post(agents.admin, `/api/pairsets/${id}/cancel`).expect(200);
  });

  it("never changes a built pairset; a new version copies its definition into the next version's draft", async () => {
    expect((await post(agents.engineer, `/api/pairsets/${builtId}/build`).expect(409)).body.error.code).toBe(
      'pairset_built',
    );
    const original = (await Pairset.findByPk(builtId))!;
    const latest = (await Pairset.max<number, Pairset>('version', { where: { name: original.name } }))!;
    const response = await post(agents.other, `/api/pairsets/${builtId}/new-version`).expect(201);
    expect(response.body).toMatchObject({
      name: original.name,
      version: latest + 1,
      state: 'draft',
      definition: original.definition,
    });
    expect(response.body.ownerId).toBe((await User.findByEmail('other@example.test'))!.id);
    await post(agents.other, '/api/pairsets/987654/new-version').expect(404);
  });
});

describe('files of a built pairset', () => {
  it('serves pairset.json and each shard, and 409 before a pairset is built', async () => {
    const manifest = await agents.other.agent.get(`/api/pairsets/${builtId}/manifest`).expect(200);
    expect(manifest.headers['content-type']).toMatch(/^application\/json/);
    expect(manifest.body.pairset.id).toBe(builtId);
    const shard = await agents.other.agent
      .get(`/api/pairsets/${builtId}/shards/0`)
      .buffer(true)
      .parse(binary)
      .expect(200);
    expect(shard.headers['content-type']).toBe('application/x-tar');
    expect(shard.headers['content-disposition']).toContain(manifest.body.shards[0].file);
    expect((shard.body as Buffer).length).toBe(manifest.body.shards[0].bytes);
    const count = manifest.body.shards.length as number;
    await agents.other.agent.get(`/api/pairsets/${builtId}/shards/${count}`).expect(404);
    expect((await agents.other.agent.get(`/api/pairsets/${builtId}/shards/-1`).expect(400)).body.error.message).toMatch(
      /^index/,
    );
    const draftId = await createDraft(agents.engineer, { name: 'draft only' });
    for (const part of ['manifest', 'shards/0', 'difficulty']) {
      const response = await agents.engineer.agent.get(`/api/pairsets/${draftId}/${part}`).expect(409);
      expect(response.body.error.code).toBe('not_built');
    }
  });

  it('answers a Range of a shard with 206 and exactly those bytes (resumable downloads)', async () => {
    const whole = (await agents.other.agent.get(`/api/pairsets/${builtId}/shards/0`).buffer(true).parse(binary))
      .body as Buffer;
    const part = await agents.other.agent
      .get(`/api/pairsets/${builtId}/shards/0`)
      .set('Range', 'bytes=512-1535')
      .buffer(true)
      .parse(binary)
      .expect(206);
    expect(part.headers['content-range']).toBe(`bytes 512-1535/${whole.length}`);
    expect(part.body).toEqual(whole.subarray(512, 1536));
    const tail = await agents.other.agent
      .get(`/api/pairsets/${builtId}/shards/0`)
      .set('Range', `bytes=${whole.length - 1024}-`)
      .buffer(true)
      .parse(binary)
      .expect(206);
    expect((tail.body as Buffer).every((byte) => byte === 0)).toBe(true);
  });

  it('serves the pair-difficulty report', async () => {
    const { body } = await agents.other.agent.get(`/api/pairsets/${builtId}/difficulty`).expect(200);
    expect(body).toMatchObject({ temperature: 0.07, ks: [16, 64, 256] });
    expect(body.kinds.map((kind: { kind: string }) => kind.kind)).toEqual([
      'frame~neighbour+1',
      'frame~neighbour+2',
      'frame~motion',
    ]);
    expect(body.kinds[0].results[0]).toMatchObject({ k: 16, reading: expect.any(String), message: expect.any(String) });
  });
});

describe('bytes and deleting', () => {
  it('counts a built pairset against its owner, refuses a build over quota and frees the bytes on delete', async () => {
    const owner = (await User.findByEmail('engineer@example.test'))!;
    const bytes = Number((await Pairset.findByPk(builtId))!.bytes);
    const before = (await agents.engineer.agent.get('/api/me/storage').expect(200)).body.usedBytes as number;
    expect(before).toBe(bytes);
    await owner.update({ quotaBytes: bytes });
    const draftId = await createDraft(agents.engineer, { name: 'over quota' });
    const refused = await post(agents.engineer, `/api/pairsets/${draftId}/build`).expect(413);
    expect(refused.body.error.code).toBe('quota_exceeded');
    await owner.update({ quotaBytes: null });

    const building = await createDraft(agents.engineer, { name: 'busy' });
    await post(agents.engineer, `/api/pairsets/${building}/build`).expect(202);
    const remove = (id: number) =>
      agents.engineer.agent.delete(`/api/pairsets/${id}`).set('x-csrf-token', agents.engineer.csrf);
    const busy = await remove(building);
    expect([busy.status, busy.body.error.code]).toEqual([409, 'build_running']);
    await post(agents.engineer, `/api/pairsets/${building}/cancel`).expect(200);

    const dir = storagePaths(server.storageDir).pairsetDir(builtId);
    expect(fs.existsSync(dir)).toBe(true);
    await remove(builtId).expect(204);
    expect(await Pairset.findByPk(builtId)).toBeNull();
    expect(await Shard.count({ where: { pairsetId: builtId } })).toBe(0);
    expect(fs.existsSync(dir)).toBe(false);
    expect((await agents.engineer.agent.get('/api/me/storage').expect(200)).body.usedBytes).toBe(before - bytes);
    await remove(builtId).expect(404);
  });
});
