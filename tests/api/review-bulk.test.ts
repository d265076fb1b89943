import { Op } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Clip, Job, Verdict, type User } from '../../server/core/models';
import type { BulkResult } from '../../shared/types/review';
import { castForReview } from '../helpers/review-cast';
import { insertReviewClip, reviewClipRow } from '../helpers/review-clips';
import { addUser, agentWithCsrf, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

type SignedIn = Awaited<ReturnType<typeof signedInAgent>>;
let server: TestServer;
let operator: SignedIn;
let engineer: SignedIn;
let curator: SignedIn;
let secondCurator: SignedIn;
let admin: SignedIn;
let curatorUser: User;
let uploader: User;
let otherUploader: User;
let projectId: number;

const bulk = (as: SignedIn, body: object) => as.agent.post('/api/review/bulk').set('x-csrf-token', as.csrf).send(body);
const claim = (as: SignedIn, id: number) => as.agent.post(`/api/clips/${id}/claim`).set('x-csrf-token', as.csrf);
const outcomes = (results: BulkResult[]) => Object.fromEntries(results.map((r) => [r.clipId, r.outcome]));

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
  } = await castForReview(server, 'Bulk'));
  otherUploader = await addUser(server, 'operator', 'second-operator@example.test');
});
afterAll(async () => {
  await server.close();
});

describe('POST /api/review/bulk', () => {
  it('is for curators and admins and validates the body', async () => {
    const id = (await insertReviewClip({ projectId, uploaderId: uploader.id })).id;
    const anonymous = await agentWithCsrf(server);
    await anonymous.agent
      .post('/api/review/bulk')
      .set('x-csrf-token', anonymous.csrf)
      .send({ clipIds: [id], decision: 'accept' })
      .expect(401);
    await bulk(operator, { clipIds: [id], decision: 'accept' }).expect(403);
    await bulk(engineer, { clipIds: [id], decision: 'accept' }).expect(403);
    const neither = await bulk(curator, { decision: 'accept' }).expect(400);
    expect(neither.body.error.message).toMatch(/^clipIds: give either clipIds or filter/);
    const both = await bulk(curator, { clipIds: [id], filter: {}, decision: 'accept' }).expect(400);
    expect(both.body.error.message).toMatch(/^clipIds/);
    const noReason = await bulk(curator, { clipIds: [id], decision: 'reject' }).expect(400);
    expect(noReason.body.error.message).toMatch(/^reason/);
    const badFilter = await bulk(curator, { filter: { hasFlag: ['gloomy'] }, decision: 'accept' }).expect(400);
    expect(badFilter.body.error.message).toMatch(/^filter\.hasFlag/);
    const unknownFilter = await bulk(curator, { filter: { state: 'accepted' }, decision: 'accept' }).expect(400);
    expect(unknownFilter.body.error.message).toMatch(/state/);
    const tooMany = await bulk(curator, {
      clipIds: Array.from({ length: 1001 }, (_, i) => i + 1),
      decision: 'accept',
    }).expect(400);
    expect(tooMany.body.error.message).toMatch(/^clipIds: at most 1000/);
    expect((await Clip.findByPk(id))!.state).toBe('awaiting_review');
  });

  it('decides claimable clips and skips ones claimed by someone else or already decided, in one go', async () => {
    const free = (await insertReviewClip({ projectId, uploaderId: uploader.id })).id;
    const mine = (await insertReviewClip({ projectId, uploaderId: uploader.id })).id;
    const theirs = (await insertReviewClip({ projectId, uploaderId: uploader.id })).id;
    const lapsed = (await insertReviewClip({ projectId, uploaderId: otherUploader.id })).id;
    const decided = (await insertReviewClip({ projectId, uploaderId: uploader.id, state: 'accepted' })).id;
    await claim(curator, mine).expect(200);
    await claim(secondCurator, theirs).expect(200);
    await claim(secondCurator, lapsed).expect(200);
    await Clip.update({ claimExpiresAt: new Date(Date.now() - 1000) }, { where: { id: lapsed } });

    const { body } = await bulk(curator, {
      clipIds: [free, mine, theirs, lapsed, decided, 99_999],
      decision: 'reject',
      reason: 'blurry',
      comment: 'focus off',
    }).expect(200);
    expect(outcomes(body.results)).toEqual({
      [free]: 'applied',
      [mine]: 'applied',
      [theirs]: 'skipped',
      [lapsed]: 'applied',
      [decided]: 'skipped',
      99999: 'skipped',
    });
    const skipped = body.results.find((r: BulkResult) => r.clipId === theirs);
    expect(skipped.message).toMatch(/^claimed by Second curator until/);

    const states = await Clip.findAll({ where: { id: [free, mine, theirs, lapsed, decided] }, order: [['id', 'ASC']] });
    expect(states.map((clip) => [clip.state, clip.claimedBy])).toEqual([
      ['rejected', null],
      ['rejected', null],
      ['awaiting_review', expect.any(Number)],
      ['rejected', null],
      ['accepted', null],
    ]);
    const verdicts = await Verdict.findAll({ where: { clipId: [free, mine, lapsed] } });
    expect(verdicts.map((v) => [v.decision, v.reason, v.reasonLabel, v.comment, v.bulk, v.curatorId])).toEqual(
      Array.from({ length: 3 }, () => ['reject', 'blurry', 'Blurry', 'focus off', true, curatorUser.id]),
    );
    // One event per decided clip (its history), one for the action itself.
    const perClip = await AuditEvent.findAll({
      where: { action: 'clip.verdict', targetId: [free, mine, lapsed].map(String) },
    });
    expect(perClip).toHaveLength(3);
    const action = await AuditEvent.findOne({ where: { action: 'review.bulk' }, order: [['id', 'DESC']] });
    expect(action!.detail).toMatchObject({
      decision: 'reject',
      applied: [free, mine, lapsed],
      skipped: 3,
      chosenBy: 'clipIds',
    });
    // Both uploaders of rejected clips get a digest job.
    const jobs = await Job.findAll({ where: { kind: 'send-rejection-digest' } });
    expect(jobs.map((job) => (job.payload as { uploaderId: number }).uploaderId).sort()).toEqual(
      [uploader.id, otherUploader.id].sort(),
    );
  });

  it('decides every clip matching a queue filter, e.g. all flagged dark', async () => {
    const dark = await Promise.all(
      [1, 2, 3].map(() => insertReviewClip({ projectId, uploaderId: uploader.id, flags: ['dark'], site: 'Cellar' })),
    );
    const darkAndBlurry = await insertReviewClip({
      projectId,
      uploaderId: uploader.id,
      flags: ['dark', 'blurry'],
      site: 'Cellar',
    });
    const bright = await insertReviewClip({ projectId, uploaderId: uploader.id, flags: [], site: 'Cellar' });
    await claim(secondCurator, dark[0]!.id).expect(200);
    const { body } = await bulk(admin, {
      filter: { site: 'Cellar', hasFlag: 'dark', lacksFlag: ['blurry'] },
      decision: 'reject',
      reason: 'too-dark',
    }).expect(200);
    expect(outcomes(body.results)).toEqual({
      [dark[0]!.id]: 'skipped',
      [dark[1]!.id]: 'applied',
      [dark[2]!.id]: 'applied',
    });
    expect((await Clip.findByPk(darkAndBlurry.id))!.state).toBe('awaiting_review');
    expect((await Clip.findByPk(bright.id))!.state).toBe('awaiting_review');
    const action = await AuditEvent.findOne({ where: { action: 'review.bulk' }, order: [['id', 'DESC']] });
    expect(action!.detail).toMatchObject({ chosenBy: 'filter', filter: { site: 'Cellar', hasFlag: ['dark'] } });
  });

  it('refuses a filter matching more than 1000 clips, changing nothing', async () => {
    await Clip.bulkCreate(
      Array.from({ length: 1001 }, (_, i) =>
        reviewClipRow({
          projectId,
          uploaderId: uploader.id,
          site: 'Everywhere',
          originalName: `many-${i}.mp4`,
        }),
      ),
    );
    const refused = await bulk(curator, { filter: { site: 'Everywhere' }, decision: 'accept' }).expect(422);
    expect(refused.body.error.code).toBe('too_many_clips');
    expect(await Clip.count({ where: { site: 'Everywhere', state: { [Op.ne]: 'awaiting_review' } } })).toBe(0);
  });
});
