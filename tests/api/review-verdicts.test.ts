import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Clip, Job, Verdict, type User } from '../../server/core/models';
import { castForReview } from '../helpers/review-cast';
import { insertReviewClip } from '../helpers/review-clips';
import { agentWithCsrf, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

type SignedIn = Awaited<ReturnType<typeof signedInAgent>>;
let server: TestServer;
let operator: SignedIn;
let engineer: SignedIn;
let curator: SignedIn;
let secondCurator: SignedIn;
let admin: SignedIn;
let curatorUser: User;
let uploader: User;
let projectId: number;

const claim = (as: SignedIn, id: number) => as.agent.post(`/api/clips/${id}/claim`).set('x-csrf-token', as.csrf);
const decide = (as: SignedIn, id: number, body: object) =>
  as.agent.post(`/api/clips/${id}/verdict`).set('x-csrf-token', as.csrf).send(body);
const newClip = async () => (await insertReviewClip({ projectId, uploaderId: uploader.id })).id;
const HOUR_MS = 3600_000;

/** Moves every verdict of a clip back in time, as if given `hours` ago. */
async function ageVerdicts(clipId: number, hours: number): Promise<void> {
  await Verdict.update({ at: new Date(Date.now() - hours * HOUR_MS) }, { where: { clipId } });
}

beforeAll(async () => {
  server = await startTestServer();
  ({
    uploader: uploader,
    curatorUser,
    operator,
    engineer,
    curator,
    secondCurator,
    admin,
    projectId,
  } = await castForReview(server, 'Verdicts'));
});
afterAll(async () => {
  await server.close();
});

describe('POST /api/clips/:id/verdict', () => {
  it('is for curators and admins and validates the body', async () => {
    const id = await newClip();
    const anonymous = await agentWithCsrf(server);
    await anonymous.agent
      .post(`/api/clips/${id}/verdict`)
      .set('x-csrf-token', anonymous.csrf)
      .send({ decision: 'accept' })
      .expect(401);
    await decide(operator, id, { decision: 'accept' }).expect(403);
    await decide(engineer, id, { decision: 'accept' }).expect(403);
    const noReason = await decide(curator, id, { decision: 'reject' }).expect(400);
    expect(noReason.body.error.message).toMatch(/^reason: a rejection needs a reason/);
    const acceptWithReason = await decide(curator, id, { decision: 'accept', reason: 'blurry' }).expect(400);
    expect(acceptWithReason.body.error.message).toMatch(/^reason: only a rejection/);
    const badDecision = await decide(curator, id, { decision: 'maybe' }).expect(400);
    expect(badDecision.body.error.message).toMatch(/^decision/);
    const extra = await decide(curator, id, { decision: 'accept', score: 3 }).expect(400);
    expect(extra.body.error.message).toMatch(/score/);
    await claim(curator, id).expect(200);
    const unknown = await decide(curator, id, { decision: 'reject', reason: 'too-wet' }).expect(400);
    expect(unknown.body.error.message).toMatch(/^reason: "too-wet" is not in the reject-reasons list/);
    expect(await Verdict.count({ where: { clipId: id } })).toBe(0);
    await decide(curator, 99_999, { decision: 'accept' }).expect(404);
  });

  it('needs the caller to hold the claim; names the holder when someone else has it', async () => {
    const id = await newClip();
    const unclaimed = await decide(curator, id, { decision: 'accept' }).expect(409);
    expect(unclaimed.body.error.code).toBe('claim_required');
    await claim(secondCurator, id).expect(200);
    const taken = await decide(curator, id, { decision: 'accept' }).expect(409);
    expect(taken.body.error.message).toMatch(/claimed by Second curator/);
    expect((await Clip.findByPk(id))!.state).toBe('awaiting_review');
  });

  it('accepts: state, verdict, end of claim and audit event commit together', async () => {
    const id = await newClip();
    await claim(curator, id).expect(200);
    const { body } = await decide(curator, id, { decision: 'accept', comment: 'steady pan, good light' }).expect(200);
    expect(body).toMatchObject({ id, state: 'accepted', claim: null });
    expect(body.verdict).toMatchObject({
      decision: 'accept',
      reason: null,
      comment: 'steady pan, good light',
      curatorName: 'Test curator',
      supersededAt: null,
      bulk: false,
    });
    const clip = (await Clip.findByPk(id))!;
    expect([clip.state, clip.claimedBy]).toEqual(['accepted', null]);
    const event = await AuditEvent.findOne({ where: { action: 'clip.verdict', targetId: String(id) } });
    expect(event!.actorId).toBe(curatorUser.id);
    expect(event!.detail).toMatchObject({ decision: 'accept', comment: 'steady pan, good light' });
    // An acceptance mails nobody.
    expect(await Job.count({ where: { kind: 'send-rejection-digest' } })).toBe(0);
  });

  it("rejects with a reason from the list, keeps its words, and queues the uploader's digest", async () => {
    const id = await newClip();
    await claim(curator, id).expect(200);
    const { body } = await decide(curator, id, { decision: 'reject', reason: 'too-dark', comment: 'lens cap?' }).expect(
      200,
    );
    expect(body.state).toBe('rejected');
    expect(body.verdict).toMatchObject({
      decision: 'reject',
      reason: 'too-dark',
      reasonLabel: 'Too dark',
      comment: 'lens cap?',
    });
    const jobs = await Job.findAll({ where: { kind: 'send-rejection-digest' } });
    expect(jobs.map((job) => job.payload)).toEqual([{ uploaderId: uploader.id }]);
  });

  it('lets the curator change their verdict within 24 hours, keeping the history', async () => {
    const id = await newClip();
    await claim(curator, id).expect(200);
    await decide(curator, id, { decision: 'accept' }).expect(200);
    await ageVerdicts(id, 23);
    // The verdict ended the claim; changing it starts with a new one, as the review screen does.
    await claim(curator, id).expect(200);
    const { body } = await decide(curator, id, { decision: 'reject', reason: 'camera-shake' }).expect(200);
    expect(body.state).toBe('rejected');
    const inForce = (v: { decision: string; supersededAt: string | null }) => [v.decision, v.supersededAt === null];
    expect(body.verdicts.map(inForce)).toEqual([
      ['accept', false],
      ['reject', true],
    ]);
    expect(await AuditEvent.count({ where: { action: 'clip.verdict_change', targetId: String(id) } })).toBe(1);
  });

  it('refuses the change after 24 hours, and to another curator; an admin changes any verdict any time', async () => {
    const id = await newClip();
    await claim(curator, id).expect(200);
    await decide(curator, id, { decision: 'accept' }).expect(200);
    await ageVerdicts(id, 25);
    await claim(curator, id).expect(200);
    const late = await decide(curator, id, { decision: 'reject', reason: 'blurry' }).expect(403);
    expect(late.body.error.code).toBe('change_window_closed');
    expect(late.body.error.message).toMatch(/24 hours/);

    const other = await newClip();
    await claim(curator, other).expect(200);
    await decide(curator, other, { decision: 'accept' }).expect(200);
    await claim(secondCurator, other).expect(200);
    const notTheirs = await decide(secondCurator, other, { decision: 'reject', reason: 'blurry' }).expect(403);
    expect(notTheirs.body.error.message).toMatch(/decided by Test curator/);

    const byAdmin = await decide(admin, id, { decision: 'reject', reason: 'duplicate', comment: 'same as 12' }).expect(
      200,
    );
    expect(byAdmin.body.verdict).toMatchObject({
      decision: 'reject',
      curatorName: 'Test admin',
      reasonLabel: 'Duplicate',
    });
    expect(byAdmin.body.verdicts).toHaveLength(2);
    expect(await Verdict.count({ where: { clipId: id, supersededAt: null } })).toBe(1);
  });

  it('refuses clips still being processed', async () => {
    const id = (await insertReviewClip({ projectId, uploaderId: uploader.id, state: 'processing' })).id;
    const refused = await decide(admin, id, { decision: 'accept' }).expect(409);
    expect(refused.body.error.code).toBe('not_reviewable');
  });
});

describe('verdicts on the clip API', () => {
  it('show the operator the verdict, reason and comment on their clips, in the library and the detail', async () => {
    const id = await newClip();
    await claim(curator, id).expect(200);
    await decide(curator, id, { decision: 'reject', reason: 'privacy-concern', comment: 'faces at the gate' }).expect(
      200,
    );
    const list = await operator.agent.get('/api/clips?state=rejected&pageSize=200').expect(200);
    const row = list.body.items.find((item: { id: number }) => item.id === id);
    expect(row.verdict).toMatchObject({
      reasonLabel: 'Privacy concern',
      comment: 'faces at the gate',
      curatorName: 'Test curator',
    });
    expect(row.uploaderName).toBe(uploader.name);
    expect(row.projectName).not.toBe('');
    const detail = await operator.agent.get(`/api/clips/${id}`).expect(200);
    expect(detail.body.verdicts).toHaveLength(1);
    expect(detail.body.history.at(-1)).toMatchObject({
      action: 'clip.verdict',
      actorName: 'Test curator',
      detail: { message: 'rejected: Privacy concern (“faces at the gate”)' },
    });
  });
});
