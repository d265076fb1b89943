import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, Project, User } from '../../server/core/models';
import { flagBits } from '../../server/core/review/review-queue';
import { FLAG_NAMES } from '../../shared/flag-thresholds';
import { REVIEW_SORT_FIELDS } from '../../shared/schemas/review';
import type { ReviewQueueItem } from '../../shared/types/review';
import { insertReviewClip } from '../helpers/review-clips';
import { addUser, signedInAgent, startTestServer, type TestServer } from '../helpers/test-server';

type SignedIn = Awaited<ReturnType<typeof signedInAgent>>;
let server: TestServer;
let operator: SignedIn;
let engineer: SignedIn;
let curator: SignedIn;
let admin: SignedIn;
const clip: Record<string, number> = {};
let northRows: number;
let creek: number;
let firstUploader: User;
let secondUploader: User;

const days = (n: number) => new Date(Date.now() - n * 86_400_000);
const ids = (body: { items: ReviewQueueItem[] }) => body.items.map((item) => item.id);

beforeAll(async () => {
  server = await startTestServer();
  firstUploader = await addUser(server, 'operator');
  secondUploader = await addUser(server, 'operator', 'second-operator@example.test');
  await secondUploader.update({ name: 'Second operator' });
  await addUser(server, 'engineer');
  const curatorUser = await addUser(server, 'curator');
  await addUser(server, 'admin');
  operator = await signedInAgent(server, 'operator@example.test');
  engineer = await signedInAgent(server, 'engineer@example.test');
  curator = await signedInAgent(server, 'curator@example.test');
  admin = await signedInAgent(server, 'admin@example.test');
  const settings = {
    estimator: 'farneback',
    estimatorParams: {},
    sampleFps: 5,
    workingSize: 320,
    deltas: [1],
    flagThresholds: {},
  };
  northRows = (await Project.create({ name: 'North rows', ...settings })).id;
  creek = (await Project.create({ name: 'Creek', ...settings })).id;
  const first = { projectId: northRows, uploaderId: firstUploader.id };
  const second = { projectId: northRows, uploaderId: secondUploader.id };
  clip.dusk = (
    await insertReviewClip({
      ...first,
      originalName: 'dusk.mp4',
      flags: ['dark'],
      site: 'North',
      medianSharpness: 30,
      meanMotion: 0.1,
      capturedAt: new Date('2026-03-01T06:00:00Z'),
      createdAt: days(3),
    })
  ).id;
  clip.night = (
    await insertReviewClip({
      ...first,
      originalName: 'night.mp4',
      flags: ['dark', 'blurry'],
      site: 'North',
      medianSharpness: 10,
      meanMotion: null,
      capturedAt: new Date('2026-03-02T06:00:00Z'),
      createdAt: days(2),
    })
  ).id;
  clip.noon = (
    await insertReviewClip({
      ...second,
      originalName: 'noon.mp4',
      site: 'South',
      medianSharpness: 300,
      meanMotion: 2.5,
      usablePairs: 120,
      capturedAt: new Date('2026-03-05T12:00:00Z'),
      createdAt: days(1),
    })
  ).id;
  clip.decided = (await insertReviewClip({ ...second, flags: ['blurry'], state: 'accepted' })).id;
  clip.cuts = (
    await insertReviewClip({
      projectId: creek,
      uploaderId: firstUploader.id,
      originalName: 'cuts.mp4',
      flags: ['cut-heavy'],
      site: 'Creek',
      medianSharpness: 200,
      cutCount: 9,
      usablePairs: 12,
    })
  ).id;
  clip.busy = (await insertReviewClip({ ...first, state: 'processing' })).id;
  await Clip.update(
    { claimedBy: curatorUser.id, claimExpiresAt: new Date(Date.now() + 600_000) },
    { where: { id: clip.dusk } },
  );
});
afterAll(async () => {
  await server.close();
});

describe('GET /api/review/queue', () => {
  it('is for curators and admins', async () => {
    await request(server.app).get('/api/review/queue').expect(401);
    await operator.agent.get('/api/review/queue').expect(403);
    await engineer.agent.get('/api/review/queue').expect(403);
    await curator.agent.get('/api/review/queue').expect(200);
    await admin.agent.get('/api/review/queue').expect(200);
  });

  it('refuses unknown parameters, flags and sort keys, naming the field', async () => {
    const unknown = await curator.agent.get('/api/review/queue?colour=red').expect(400);
    expect(unknown.body.error.message).toMatch(/colour/);
    const flag = await curator.agent.get('/api/review/queue?hasFlag=dark,gloomy').expect(400);
    expect(flag.body.error.message).toMatch(/^hasFlag/);
    const sort = await curator.agent.get('/api/review/queue?sort=sizeBytes').expect(400);
    expect(sort.body.error.message).toMatch(/^sort/);
  });

  it('lists only clips awaiting review, oldest upload first, with names, signals and the live claim', async () => {
    const { body } = await curator.agent.get('/api/review/queue').expect(200);
    expect(body).toMatchObject({ total: 4, page: 1, pageSize: 50 });
    // The fixture's createdAt: dusk 3 days ago, night 2, noon 1, cuts now.
    expect(ids(body)).toEqual([clip.dusk, clip.night, clip.noon, clip.cuts]);
    const dusk = body.items[0] as ReviewQueueItem;
    expect(dusk).toMatchObject({
      originalName: 'dusk.mp4',
      projectName: 'North rows',
      uploaderName: 'Test operator',
      site: 'North',
      flags: ['dark'],
      medianSharpness: 30,
      meanMotion: 0.1,
      capturedAt: '2026-03-01T06:00:00.000Z',
      claim: { holderName: 'Test curator' },
    });
    expect(body.items[1].meanMotion).toBeNull();
    expect(body.items[1].claim).toBeNull();
  });

  it('filters by flags present, absent, any or none', async () => {
    const has = async (query: string) => ids((await curator.agent.get(`/api/review/queue?${query}`).expect(200)).body);
    expect(await has('hasFlag=dark')).toEqual([clip.dusk, clip.night]);
    expect(await has('hasFlag=dark,blurry')).toEqual([clip.night]);
    expect(await has('lacksFlag=dark')).toEqual([clip.noon, clip.cuts]);
    expect(await has('hasFlag=dark&lacksFlag=blurry')).toEqual([clip.dusk]);
    expect(await has('flagged=false')).toEqual([clip.noon]);
    expect(await has('flagged=true')).toEqual([clip.dusk, clip.night, clip.cuts]);
  });

  it('filters by project, site, uploader and captured-at range', async () => {
    const has = async (query: string) => ids((await curator.agent.get(`/api/review/queue?${query}`).expect(200)).body);
    expect(await has(`projectId=${creek}`)).toEqual([clip.cuts]);
    expect(await has('site=South')).toEqual([clip.noon]);
    expect(await has(`uploaderId=${secondUploader.id}`)).toEqual([clip.noon]);
    expect(await has('capturedFrom=2026-03-01T12:00:00Z&capturedTo=2026-03-06T00:00:00%2B02:00')).toEqual([
      clip.night,
      clip.noon,
    ]);
  });

  it('sorts by any signal both ways and pages', async () => {
    // medianSharpness of the fixture: night 10, dusk 30, cuts 200, noon 300.
    const up = await curator.agent.get('/api/review/queue?sort=medianSharpness').expect(200);
    expect(ids(up.body)).toEqual([clip.night, clip.dusk, clip.cuts, clip.noon]);
    const down = await curator.agent.get('/api/review/queue?sort=-usablePairs').expect(200);
    expect(ids(down.body)[0]).toBe(clip.noon);
    const cuts = await curator.agent.get('/api/review/queue?sort=-cutCount&pageSize=1').expect(200);
    expect(ids(cuts.body)).toEqual([clip.cuts]);
    const page = await curator.agent.get('/api/review/queue?sort=-flagCount&pageSize=2&page=2').expect(200);
    // flagCount: night 2, dusk 1 and cuts 1 (ties by id, descending: cuts was inserted after dusk), noon 0.
    expect(page.body).toMatchObject({ total: 4, page: 2, pageSize: 2 });
    expect(ids(page.body)).toEqual([clip.dusk, clip.noon]);
  });
});

describe('every sort key', () => {
  it('reads its own index in both directions (each is named by the queue)', async () => {
    for (const field of REVIEW_SORT_FIELDS) {
      for (const sort of [field, `-${field}`]) {
        const { body } = await curator.agent.get(`/api/review/queue?sort=${sort}&hasFlag=dark`).expect(200);
        expect(body.total).toBe(2);
      }
    }
  });

  it('keeps the count on the narrowest index for each filter', async () => {
    // Each query names a different index for its total (review-queue.ts countIndex); all agree with the fixture.
    const totals = await Promise.all(
      [
        `uploaderId=${firstUploader.id}`,
        'site=North',
        `projectId=${northRows}`,
        'capturedFrom=2026-01-01T00:00:00Z',
        'flagged=true',
      ].map(async (query) => (await curator.agent.get(`/api/review/queue?${query}`).expect(200)).body.total),
    );
    expect(totals).toEqual([3, 2, 3, 3, 3]);
  });
});

describe('the flagMask column', () => {
  it('sets bit i for the i-th flag name, as the server reads it, for every flag', async () => {
    const idle = { projectId: creek, uploaderId: firstUploader.id, state: 'failed' as const };
    // The column's bit order is frozen in migration 0006-review (kept by triggers); the server derives bits from
    // FLAG_NAMES.
    for (const flag of FLAG_NAMES) {
      const row = await insertReviewClip({ ...idle, flags: [flag] });
      const [stored] = (await server.sequelize.query('SELECT "flagMask", "flagCount" FROM clips WHERE id = ?', {
        replacements: [row.id],
        plain: false,
        raw: true,
      })) as [{ flagMask: number; flagCount: number }[], unknown];
      expect(stored[0]).toEqual({ flagMask: flagBits([flag]), flagCount: 1 });
    }
    const all = await insertReviewClip({ ...idle, flags: [...FLAG_NAMES] });
    const maskOf = async (id: number) =>
      (
        (await server.sequelize.query('SELECT "flagMask", "flagCount" FROM clips WHERE id = ?', {
          replacements: [id],
          raw: true,
        })) as [{ flagMask: number; flagCount: number }[], unknown]
      )[0][0];
    expect(await maskOf(all.id)).toEqual({ flagMask: 2 ** FLAG_NAMES.length - 1, flagCount: FLAG_NAMES.length });
    // Reprocessing rewrites the flags; the mask follows.
    await all.update({ flags: ['blurry', 'shaky'] });
    expect(await maskOf(all.id)).toEqual({ flagMask: flagBits(['blurry', 'shaky']), flagCount: 2 });
  });
});

describe('GET /api/review/facets', () => {
  it('lists uploaders and sites of the queue with counts, for curators and admins', async () => {
    await request(server.app).get('/api/review/facets').expect(401);
    await operator.agent.get('/api/review/facets').expect(403);
    await engineer.agent.get('/api/review/facets').expect(403);
    await curator.agent.get('/api/review/facets?x=1').expect(400);
    const { body } = await admin.agent.get('/api/review/facets').expect(200);
    // By name: the fixture has dusk, night and cuts from the first uploader, noon from the second.
    expect(body.uploaders).toEqual([
      { id: secondUploader.id, name: 'Second operator', count: 1 },
      { id: firstUploader.id, name: 'Test operator', count: 3 },
    ]);
    expect(body.sites).toEqual([
      { site: 'Creek', count: 1 },
      { site: 'North', count: 2 },
      { site: 'South', count: 1 },
    ]);
  });
});
