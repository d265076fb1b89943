import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Clip, Frame, Project, Verdict, type User } from '../../server/core/models';
import { UNDO_SECONDS } from '../../shared/review/rules';
import { castForReview } from '../helpers/review-cast';
import { insertReviewClip } from '../helpers/review-clips';
import { agentWithCsrf, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

type SignedIn = Awaited<ReturnType<typeof signedInAgent>>;
let server: TestServer;
let operator: SignedIn;
let curator: SignedIn;
let secondCurator: SignedIn;
let admin: SignedIn;
let curatorUser: User;
let uploader: User;
let projectId: number;
/** A project of its own for the ordering tests, so other tests' clips never enter their queue. */
let orderProjectId: number;

const claim = (as: SignedIn, id: number) => as.agent.post(`/api/clips/${id}/claim`).set('x-csrf-token', as.csrf);
const decide = (as: SignedIn, id: number, body: object) =>
  as.agent.post(`/api/clips/${id}/verdict`).set('x-csrf-token', as.csrf).send(body);
const undo = (as: SignedIn, id: number, body: object) =>
  as.agent.post(`/api/clips/${id}/verdict/undo`).set('x-csrf-token', as.csrf).send(body);
const next = (as: SignedIn, query: Record<string, string | number>) =>
  as.agent.get('/api/review/queue/next').query(query);

beforeAll(async () => {
  server = await startTestServer();
  ({ uploader, curatorUser, operator, curator, secondCurator, admin, projectId } = await castForReview(server, 'Flow'));
  orderProjectId = (
    await Project.create({
      name: 'Flow order',
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

describe('GET /api/review/queue/next', () => {
  /** Sharpness 300, 100, null, 200, 100 (ids in that order), three of them flagged blurry. */
  async function sortedQueue() {
    const make = async (medianSharpness: number | null, flags: ('blurry' | 'dark')[]) => {
      const clip = await insertReviewClip({ projectId: orderProjectId, uploaderId: uploader.id, flags });
      // The helper fills a missing sharpness in, so the unmeasured one is written afterwards.
      return clip.update({ medianSharpness });
    };
    return [
      await make(300, ['dark']),
      await make(100, ['blurry']),
      await make(null, ['blurry']),
      await make(200, ['blurry']),
      await make(100, []),
    ].map((clip) => clip.id);
  }

  it('is for curators and validates the query', async () => {
    const anonymous = await agentWithCsrf(server);
    await anonymous.agent.get('/api/review/queue/next').query({ after: 1 }).expect(401);
    await next(operator, { after: 1 }).expect(403);
    const missing = await next(curator, {}).expect(400);
    expect(missing.body.error.message).toMatch(/^after/);
    const paged = await next(curator, { after: 1, page: 2 }).expect(400);
    expect(paged.body.error.message).toMatch(/page/);
    await next(curator, { after: 1, limit: 11 }).expect(400);
    await next(curator, { after: 999_999 }).expect(404);
  });

  it('follows the sort and the filter from the anchor on, even once the anchor is decided', async () => {
    const [a, b, c, d, e] = await sortedQueue();
    const filter = { projectId: orderProjectId };
    // Sharpness going up, NULL first (SQLite's order), ties by id: c(null), b(100), e(100), d(200), a(300).
    const up = await next(curator, { ...filter, sort: 'medianSharpness', after: b!, limit: 10 }).expect(200);
    expect(up.body.items.map((item: { id: number }) => item.id)).toEqual([e, d, a]);
    const fromNull = await next(curator, { ...filter, sort: 'medianSharpness', after: c!, limit: 10 }).expect(200);
    expect(fromNull.body.items.map((item: { id: number }) => item.id)).toEqual([b, e, d, a]);
    // Going down: a, d, e, b, c (NULL last).
    const down = await next(curator, { ...filter, sort: '-medianSharpness', after: e!, limit: 10 }).expect(200);
    expect(down.body.items.map((item: { id: number }) => item.id)).toEqual([b, c]);
    // Blurry only, going down: d, b, c. The anchor b is decided first: what follows it stays the same.
    await claim(curator, b!).expect(200);
    await decide(curator, b!, { decision: 'accept' }).expect(200);
    const blurry = await next(curator, { ...filter, hasFlag: 'blurry', sort: '-medianSharpness', after: b! }).expect(
      200,
    );
    expect(blurry.body.items.map((item: { id: number }) => item.id)).toEqual([c]);
    // A clip someone else holds is passed over.
    await claim(secondCurator, d!).expect(200);
    const held = await next(curator, { ...filter, sort: 'medianSharpness', after: e!, limit: 10 }).expect(200);
    expect(held.body.items.map((item: { id: number }) => item.id)).toEqual([a]);
  });
});

describe('POST /api/clips/:id/verdict/undo', () => {
  const decided = async (as: SignedIn, decision: object = { decision: 'accept' }) => {
    const clip = await insertReviewClip({ projectId, uploaderId: uploader.id });
    await claim(as, clip.id).expect(200);
    const { body } = await decide(as, clip.id, decision).expect(200);
    return { id: clip.id, verdictId: body.verdict.id as number };
  };

  it('validates the body and the caller', async () => {
    const { id, verdictId } = await decided(curator);
    await undo(operator, id, { verdictId }).expect(403);
    const bad = await undo(curator, id, {}).expect(400);
    expect(bad.body.error.message).toMatch(/^verdictId/);
    await undo(curator, id, { verdictId, extra: 1 }).expect(400);
    const other = await undo(secondCurator, id, { verdictId }).expect(403);
    expect(other.body.error.code).toBe('not_your_verdict');
    const wrong = await undo(curator, id, { verdictId: verdictId + 1000 }).expect(409);
    expect(wrong.body.error.code).toBe('verdict_changed');
    await undo(curator, 999_999, { verdictId }).expect(404);
    expect((await Clip.findByPk(id))!.state).toBe('accepted');
  });

  it('puts the clip back in the queue, claimed by the curator, keeping and auditing both', async () => {
    const { id, verdictId } = await decided(curator, { decision: 'reject', reason: 'blurry' });
    const { body } = await undo(curator, id, { verdictId }).expect(200);
    expect(body).toMatchObject({ state: 'awaiting_review', verdict: null, claim: { holderId: curatorUser.id } });
    expect(body.verdicts).toHaveLength(1);
    expect(body.verdicts[0].supersededAt).not.toBeNull();
    const events = await AuditEvent.findAll({
      where: { targetType: 'clip', targetId: String(id) },
      order: [['id', 'ASC']],
    });
    const actions = events.map((event) => event.action);
    expect(actions).toEqual(['clip.verdict', 'clip.verdict_undo']);
    // Back in the queue and decidable again at once.
    const queue = await curator.agent.get('/api/review/queue').query({ projectId, pageSize: 200 }).expect(200);
    expect(queue.body.items.map((item: { id: number }) => item.id)).toContain(id);
    await decide(curator, id, { decision: 'accept' }).expect(200);
    // An undone verdict cannot be undone twice.
    await undo(curator, id, { verdictId }).expect(409);
  });

  it('refuses after the undo window and for a verdict that replaced another', async () => {
    const late = await decided(curator);
    await Verdict.update({ at: new Date(Date.now() - (UNDO_SECONDS + 1) * 1000) }, { where: { id: late.verdictId } });
    const closed = await undo(curator, late.id, { verdictId: late.verdictId }).expect(409);
    expect(closed.body.error.code).toBe('undo_window_closed');
    const changed = await decided(curator);
    await claim(curator, changed.id).expect(200);
    const second = await decide(curator, changed.id, { decision: 'reject', reason: 'blurry' }).expect(200);
    const refused = await undo(curator, changed.id, { verdictId: second.body.verdict.id }).expect(409);
    expect(refused.body.error.code).toBe('not_first_verdict');
    expect((await Clip.findByPk(changed.id))!.state).toBe('rejected');
  });

  it("lets an admin undo a curator's verdict", async () => {
    const { id, verdictId } = await decided(curator);
    await undo(admin, id, { verdictId }).expect(200);
    expect((await Clip.findByPk(id))!.state).toBe('awaiting_review');
  });
});

describe('GET /api/clips/:id/compare/:otherId', () => {
  const compare = (as: SignedIn, id: number | string, otherId: number | string) =>
    as.agent.get(`/api/clips/${id}/compare/${otherId}`);
  /** Frames with the given hashes (16 hex digits each). */
  const withFrames = async (hashes: string[]) => {
    const clip = await insertReviewClip({ projectId, uploaderId: uploader.id });
    await Frame.bulkCreate(hashes.map((dhash, index) => ({ clipId: clip.id, index, timeS: index / 5, dhash })));
    return clip.id;
  };

  it('is for curators and validates the ids', async () => {
    const id = await withFrames(['0000000000000000']);
    await (await agentWithCsrf(server)).agent.get(`/api/clips/${id}/compare/${id}`).expect(401);
    await compare(operator, id, id).expect(403);
    const same = await compare(curator, id, id).expect(400);
    expect(same.body.error.message).toMatch(/itself/);
    await compare(curator, id, 'x').expect(400);
    await compare(curator, id, 999_999).expect(404);
  });

  it("puts both clips' frames in step with the hash distance of each pair", async () => {
    const frames = ['00000000000000ff', '000000000000ff00', '0000000000ff0000', '00000000ff000000'];
    const original = await withFrames(frames);
    // The copy starts one frame later and its second frame in step differs in one bit (0xff00 → 0xfe00).
    const copy = await withFrames(['ffffffffffffffff', frames[0]!, '000000000000fe00', frames[2]!, frames[3]!]);
    const { body } = await compare(curator, original, copy).expect(200);
    expect(body).toMatchObject({
      shift: 1,
      maxDistance: 5,
      clip: { id: original, frameCount: 4, state: 'awaiting_review' },
      other: { id: copy, frameCount: 5 },
    });
    expect(
      body.steps.map((step: { otherIndex: number; distance: number }) => [step.otherIndex, step.distance]),
    ).toEqual([
      [1, 0],
      [2, 1],
      [3, 0],
      [4, 0],
    ]);
  });
});
