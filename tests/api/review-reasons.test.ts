import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Project, Setting } from '../../server/core/models';
import { insertReviewClip } from '../helpers/review-clips';
import { addUser, agentWithCsrf, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

type SignedIn = Awaited<ReturnType<typeof signedInAgent>>;
let server: TestServer;
let operator: SignedIn;
let curator: SignedIn;
let admin: SignedIn;
let projectId: number;
let uploaderId: number;

const put = (as: SignedIn, body: object) =>
  as.agent.put('/api/settings/reject-reasons').set('x-csrf-token', as.csrf).send(body);

beforeAll(async () => {
  server = await startTestServer();
  uploaderId = (await addUser(server, 'operator')).id;
  await addUser(server, 'curator');
  await addUser(server, 'admin');
  operator = await signedInAgent(server, 'operator@example.test');
  curator = await signedInAgent(server, 'curator@example.test');
  admin = await signedInAgent(server, 'admin@example.test');
  projectId = (
    await Project.create({
      name: 'Reasons',
      estimator: 'farneback',
      estimatorParams: {},
      sampleFps: 5,
      workingSize: 320,
      deltas: [1],
      flagThresholds: {},
    })
  ).id;
});
afterAll(async () => {
  await server.close();
});

describe('GET /api/settings/reject-reasons', () => {
  it('answers everyone signed in with the default list from the issue, in order', async () => {
    await request(server.app).get('/api/settings/reject-reasons').expect(401);
    await curator.agent.get('/api/settings/reject-reasons?all=1').expect(400);
    const { body } = await operator.agent.get('/api/settings/reject-reasons').expect(200);
    // The defaults: too dark, overexposed, blurry, no motion, camera shake, scene cuts, duplicate,
    // privacy concern, off-topic, other.
    expect(body.reasons.map((reason: { label: string }) => reason.label)).toEqual([
      'Too dark',
      'Overexposed',
      'Blurry',
      'No motion',
      'Camera shake',
      'Scene cuts',
      'Duplicate',
      'Privacy concern',
      'Off-topic',
      'Other',
    ]);
  });
});

describe('PUT /api/settings/reject-reasons', () => {
  const reasons = [
    { code: 'too-dark', label: 'Too dark' },
    { code: 'lens-dirt', label: 'Dirt on the lens' },
    { code: 'other', label: 'Other' },
  ];

  it('is for admins only and validates the list', async () => {
    const anonymous = await agentWithCsrf(server);
    await anonymous.agent
      .put('/api/settings/reject-reasons')
      .set('x-csrf-token', anonymous.csrf)
      .send({ reasons })
      .expect(401);
    await put(curator, { reasons }).expect(403);
    await put(operator, { reasons }).expect(403);
    const empty = await put(admin, { reasons: [] }).expect(400);
    expect(empty.body.error.message).toMatch(/^reasons: reasons needs at least one/);
    const repeated = await put(admin, { reasons: [...reasons, { code: 'other', label: 'Else' }] }).expect(400);
    expect(repeated.body.error.message).toMatch(/^reasons: reason codes must not repeat/);
    const badCode = await put(admin, { reasons: [{ code: 'Too Dark', label: 'Too dark' }] }).expect(400);
    expect(badCode.body.error.message).toMatch(/^reasons\.0\.code/);
    await put(admin, { reasons, extra: true }).expect(400);
    expect(await Setting.count()).toBe(0);
  });

  it('replaces the list for everyone, records who did, and new verdicts use it', async () => {
    const clip = await insertReviewClip({ projectId, uploaderId });
    await curator.agent.post(`/api/clips/${clip.id}/claim`).set('x-csrf-token', curator.csrf).expect(200);
    await curator.agent
      .post(`/api/clips/${clip.id}/verdict`)
      .set('x-csrf-token', curator.csrf)
      .send({ decision: 'reject', reason: 'camera-shake' })
      .expect(200);

    const { body } = await put(admin, { reasons }).expect(200);
    expect(body.reasons).toEqual(reasons);
    const read = await curator.agent.get('/api/settings/reject-reasons').expect(200);
    expect(read.body.reasons).toEqual(reasons);
    const event = await AuditEvent.findOne({ where: { action: 'settings.reject_reasons' } });
    expect(event!.detail).toMatchObject({ after: ['too-dark', 'lens-dirt', 'other'] });

    const next = await insertReviewClip({ projectId, uploaderId });
    await curator.agent.post(`/api/clips/${next.id}/claim`).set('x-csrf-token', curator.csrf).expect(200);
    await curator.agent
      .post(`/api/clips/${next.id}/verdict`)
      .set('x-csrf-token', curator.csrf)
      .send({ decision: 'reject', reason: 'camera-shake' })
      .expect(400);
    const decided = await curator.agent
      .post(`/api/clips/${next.id}/verdict`)
      .set('x-csrf-token', curator.csrf)
      .send({ decision: 'reject', reason: 'lens-dirt' })
      .expect(200);
    expect(decided.body.verdict.reasonLabel).toBe('Dirt on the lens');
    // The earlier verdict keeps the words it was given with.
    const earlier = await operator.agent.get(`/api/clips/${clip.id}`).expect(200);
    expect(earlier.body.verdict).toMatchObject({ reason: 'camera-shake', reasonLabel: 'Camera shake' });
  });
});
