import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Clip, type User } from '../../server/core/models';
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
let projectId: number;
let uploaderId: number;

const claim = (as: SignedIn, id: number) => as.agent.post(`/api/clips/${id}/claim`).set('x-csrf-token', as.csrf);
const release = (as: SignedIn, id: number) => as.agent.delete(`/api/clips/${id}/claim`).set('x-csrf-token', as.csrf);
const newClip = async () => (await insertReviewClip({ projectId, uploaderId })).id;

beforeAll(async () => {
  server = await startTestServer();
  let uploaderUser: User;
  ({
    uploader: uploaderUser,
    curatorUser,
    operator,
    engineer,
    curator,
    secondCurator,
    admin,
    projectId,
  } = await castForReview(server, 'Claims'));
  uploaderId = uploaderUser.id;
});
afterAll(async () => {
  await server.close();
});

describe('POST /api/clips/:id/claim', () => {
  it('is for curators and admins, with a valid id', async () => {
    const id = await newClip();
    const anonymous = await agentWithCsrf(server);
    await anonymous.agent.post(`/api/clips/${id}/claim`).set('x-csrf-token', anonymous.csrf).expect(401);
    await claim(operator, id).expect(403);
    await claim(engineer, id).expect(403);
    const bad = await claim(curator, 0).expect(400);
    expect(bad.body.error.message).toMatch(/^id/);
    await claim(curator, 99_999).expect(404);
    await claim(admin, await newClip()).expect(200);
  });

  it('holds the clip for 15 minutes and answers 409 naming the holder to anyone else', async () => {
    const id = await newClip();
    const before = Date.now();
    const { body } = await claim(curator, id).expect(200);
    expect(body).toMatchObject({ clipId: id, holderId: curatorUser.id, holderName: 'Test curator' });
    // The rule: a claim lasts 15 minutes unless renewed.
    const expires = new Date(body.expiresAt).getTime();
    expect(expires).toBeGreaterThanOrEqual(before + 15 * 60_000);
    expect(expires).toBeLessThanOrEqual(Date.now() + 15 * 60_000);
    const stored = (await Clip.findByPk(id))!;
    expect(stored.claimedBy).toBe(curatorUser.id);

    const refused = await claim(secondCurator, id).expect(409);
    expect(refused.body.error).toMatchObject({ code: 'claimed' });
    expect(refused.body.error.message).toMatch(/claimed by Test curator until/);
    expect(refused.body.error.details.claim).toMatchObject({ holderName: 'Test curator', expiresAt: body.expiresAt });
    // An admin cannot take it over by claiming either; they release it first (below).
    await claim(admin, id).expect(409);
  });

  it('renews for the holder: the expiry moves forward', async () => {
    const id = await newClip();
    const first = await claim(curator, id).expect(200);
    await Clip.update({ claimExpiresAt: new Date(Date.now() + 60_000) }, { where: { id } });
    const renewed = await claim(curator, id).expect(200);
    expect(new Date(renewed.body.expiresAt).getTime()).toBeGreaterThan(Date.now() + 14 * 60_000);
    expect(new Date(renewed.body.expiresAt).getTime()).toBeGreaterThanOrEqual(new Date(first.body.expiresAt).getTime());
  });

  it('lapses by itself: once past its expiry anyone may claim, and the queue shows it free', async () => {
    const id = await newClip();
    await claim(curator, id).expect(200);
    await Clip.update({ claimExpiresAt: new Date(Date.now() - 1000) }, { where: { id } });
    const queue = await secondCurator.agent.get('/api/review/queue?pageSize=200').expect(200);
    expect(queue.body.items.find((item: { id: number }) => item.id === id).claim).toBeNull();
    const detail = await secondCurator.agent.get(`/api/clips/${id}`).expect(200);
    expect(detail.body.claim).toBeNull();
    const taken = await claim(secondCurator, id).expect(200);
    expect(taken.body.holderName).toBe('Second curator');
  });

  it('refuses clips that are not ready for review', async () => {
    const processing = (await insertReviewClip({ projectId, uploaderId, state: 'processing' })).id;
    const refused = await claim(curator, processing).expect(409);
    expect(refused.body.error.code).toBe('not_reviewable');
  });
});

describe('DELETE /api/clips/:id/claim', () => {
  it('is for curators and admins', async () => {
    const id = await newClip();
    const anonymous = await agentWithCsrf(server);
    await anonymous.agent.delete(`/api/clips/${id}/claim`).set('x-csrf-token', anonymous.csrf).expect(401);
    await release(operator, id).expect(403);
    await release(engineer, id).expect(403);
    await release(curator, -1).expect(400);
    await release(curator, 99_999).expect(404);
  });

  it('lets the holder release, records it, and frees the clip', async () => {
    const id = await newClip();
    await claim(curator, id).expect(200);
    await release(curator, id).expect(204);
    expect((await Clip.findByPk(id))!.claimedBy).toBeNull();
    const events = await AuditEvent.findAll({ where: { action: 'clip.claim_release', targetId: String(id) } });
    expect(events.map((event) => event.actorId)).toEqual([curatorUser.id]);
    await claim(secondCurator, id).expect(200);
  });

  it("refuses another curator, lets an admin release anyone's claim", async () => {
    const id = await newClip();
    await claim(curator, id).expect(200);
    const refused = await release(secondCurator, id).expect(403);
    expect(refused.body.error.message).toMatch(/Only Test curator/);
    await release(admin, id).expect(204);
    const event = await AuditEvent.findOne({ where: { action: 'clip.claim_release', targetId: String(id) } });
    expect(event!.detail).toMatchObject({ holderName: 'Test curator', message: "ended Test curator's claim" });
    const history = await curator.agent.get(`/api/clips/${id}`).expect(200);
    expect(history.body.history.at(-1)).toMatchObject({ action: 'clip.claim_release', actorName: 'Test admin' });
  });

  it('does nothing (and records nothing) when no live claim exists', async () => {
    const id = await newClip();
    await release(curator, id).expect(204);
    expect(await AuditEvent.count({ where: { action: 'clip.claim_release', targetId: String(id) } })).toBe(0);
  });
});
