import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Job, MailOutbox, Project, RejectionDigest, type User } from '../../server/core/models';
import { messagesTo, startTestMail } from '../helpers/mail';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { insertReviewClip } from '../helpers/review-clips';
import { addUser, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

type SignedIn = Awaited<ReturnType<typeof signedInAgent>>;
let server: TestServer;
let runtime: TestRuntime;
let mail: Awaited<ReturnType<typeof startTestMail>>;
let curator: SignedIn;
let uploader: User;
let otherUploader: User;
let projectId: number;
const HOUR_MS = 3600_000;

async function decide(uploaderId: number, name: string, body: object): Promise<number> {
  const { id } = await insertReviewClip({ projectId, uploaderId, originalName: name });
  await curator.agent.post(`/api/clips/${id}/claim`).set('x-csrf-token', curator.csrf).expect(200);
  await curator.agent.post(`/api/clips/${id}/verdict`).set('x-csrf-token', curator.csrf).send(body).expect(200);
  return id;
}

const queuedDigests = (uploaderId: number) =>
  Job.findAll({ where: { kind: 'send-rejection-digest', state: 'queued' } }).then((jobs) =>
    jobs.filter((job) => (job.payload as { uploaderId: number }).uploaderId === uploaderId),
  );

/** Moves the uploader's last digest back by `ms`, and makes their waiting digest job due now. */
async function letTimePass(uploaderId: number, ms: number): Promise<void> {
  const last = await RejectionDigest.findOne({ where: { uploaderId }, order: [['at', 'DESC']] });
  await last!.update({ at: new Date(last!.at.getTime() - ms) });
  for (const job of await queuedDigests(uploaderId)) await job.update({ runAfter: new Date() });
}

beforeAll(async () => {
  server = await startTestServer();
  runtime = startTestRuntime(server);
  mail = await startTestMail(server);
  uploader = await addUser(server, 'operator');
  otherUploader = await addUser(server, 'operator', 'second-operator@example.test');
  await addUser(server, 'curator');
  curator = await signedInAgent(server, 'curator@example.test');
  projectId = (
    await Project.create({
      name: 'Digest',
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
  await mail?.stop();
  await runtime?.close();
  await server?.close();
});

describe('the rejection digest', () => {
  let firstRejected: number;

  it('mails each uploader their rejected clips with reasons and comments, and nothing about acceptances', async () => {
    firstRejected = await decide(uploader.id, 'dawn-row-3.mp4', {
      decision: 'reject',
      reason: 'too-dark',
      comment: 'sun not up yet',
    });
    const second = await decide(uploader.id, 'dawn-row-4.mp4', { decision: 'reject', reason: 'blurry' });
    await decide(uploader.id, 'noon-row-1.mp4', { decision: 'accept' });
    await decide(otherUploader.id, 'gate.mp4', { decision: 'reject', reason: 'privacy-concern', comment: 'faces' });
    // One job per uploader however many rejections.
    expect(await queuedDigests(uploader.id)).toHaveLength(1);
    expect(await runtime.drain()).toBe(2);
    await mail.deliver();

    const [message, ...more] = await messagesTo(uploader.email);
    expect(more).toHaveLength(0);
    expect(message!.subject).toBe('Kinefold: 2 clips of yours were rejected');
    expect(message!.text).toContain(`"dawn-row-3.mp4" (clip ${firstRejected}): Too dark. Comment: sun not up yet`);
    expect(message!.text).toContain(`"dawn-row-4.mp4" (clip ${second}): Blurry`);
    expect(message!.text).not.toContain('noon-row-1.mp4');
    expect(message!.text).toContain(`${server.config.publicUrl}/clips?state=rejected`);
    const [other] = await messagesTo(otherUploader.email);
    expect(other!.subject).toBe('Kinefold: a clip of yours was rejected');
    expect(other!.text).toContain('"gate.mp4"');
    expect(other!.text).toContain('Privacy concern. Comment: faces');
    expect(other!.text).not.toContain('dawn-row');
  });

  it('sends at most one message an hour, listing only what was rejected since the last one', async () => {
    const later = await decide(uploader.id, 'dusk-row-9.mp4', { decision: 'reject', reason: 'camera-shake' });
    const changed = await decide(uploader.id, 'dusk-row-10.mp4', { decision: 'reject', reason: 'blurry' });
    // The curator changes their mind before the digest goes: that clip drops out of it.
    await curator.agent.post(`/api/clips/${changed}/claim`).set('x-csrf-token', curator.csrf).expect(200);
    await curator.agent
      .post(`/api/clips/${changed}/verdict`)
      .set('x-csrf-token', curator.csrf)
      .send({ decision: 'accept' })
      .expect(200);

    const [waiting] = await queuedDigests(uploader.id);
    const last = await RejectionDigest.findOne({ where: { uploaderId: uploader.id }, order: [['at', 'DESC']] });
    // Due one hour after the last digest, not before.
    expect(waiting!.runAfter.getTime()).toBe(last!.at.getTime() + HOUR_MS);
    expect(await runtime.drain()).toBe(0);

    // A stray job that comes due early sends nothing and puts the digest back at the allowed time.
    await waiting!.update({ runAfter: new Date() });
    expect(await runtime.drain()).toBe(1);
    expect(await MailOutbox.count({ where: { to: uploader.email } })).toBe(1);
    const [requeued] = await queuedDigests(uploader.id);
    expect(requeued!.runAfter.getTime()).toBe(last!.at.getTime() + HOUR_MS);

    await letTimePass(uploader.id, HOUR_MS);
    expect(await runtime.drain()).toBe(1);
    await mail.deliver();
    const messages = await messagesTo(uploader.email);
    expect(messages).toHaveLength(2);
    expect(messages[1]!.subject).toBe('Kinefold: a clip of yours was rejected');
    expect(messages[1]!.text).toContain(`"dusk-row-9.mp4" (clip ${later}): Camera shake`);
    expect(messages[1]!.text).not.toContain('dusk-row-10.mp4');
    expect(messages[1]!.text).not.toContain('dawn-row-3.mp4');
    expect(await RejectionDigest.count({ where: { uploaderId: uploader.id } })).toBe(2);
  });
});
