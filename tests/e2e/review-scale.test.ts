import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Clip, Project, User, Verdict } from '../../server/core/models';
import { DEMO_ACCOUNTS } from '../../server/core/people/demo-accounts';
import { launchBrowser, screenshot, signInThroughForm } from '../helpers/browser';
import { makeTestClip } from '../helpers/media-fixtures';
import { insertClip } from '../helpers/pipeline-clips';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { insertReviewClip } from '../helpers/review-clips';
import { startRunningServer, type RunningServer } from '../helpers/running-server';

/** The screen the review screen is laid out for. */
const VIEWPORT = { width: 1440, height: 900 };
let server: RunningServer;
let browser: Browser;
let runtime: TestRuntime;
let page: Page;
let processedId: number;
/** The same footage uploaded again (one byte more), flagged as a duplicate of the processed clip. */
let copyId: number;
let sortedProjectId: number;
/** The blurry clips of the sorted project, sharpest first: the queue's order under the test's filter and sort. */
let blurrySharpestFirst: number[];
const media = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-e2e-review-scale-'));
const curator = DEMO_ACCOUNTS.find((account) => account.role === 'curator')!;

beforeAll(async () => {
  server = await startRunningServer();
  browser = await launchBrowser();
  runtime = startTestRuntime(server);
  const operator = (await User.findByEmail('operator@kinefold.test'))!;
  const settings = { estimator: 'farneback', estimatorParams: {}, sampleFps: 5, workingSize: 320, flagThresholds: {} };
  // A long project name: the queue must still fit 1440 px in one line per row.
  const orchard = await Project.create({
    name: 'Terraced orchard, north block, spring rows',
    deltas: [1, 2],
    ...settings,
  });
  const file = await makeTestClip(media, 'terrace-row-4.mp4', { seconds: 3, size: '320x180', seed: 7 });
  processedId = (await insertClip(server, file, orchard.id, operator.id)).clip.id;
  expect(await runtime.drain()).toBe(1);
  expect((await Clip.findByPk(processedId))!.state).toBe('awaiting_review');
  const copy = path.join(media, 'terrace-row-4-again.mp4');
  fs.copyFileSync(file, copy);
  fs.appendFileSync(copy, Buffer.from([0]));
  copyId = (await insertClip(server, copy, orchard.id, operator.id)).clip.id;
  expect(await runtime.drain()).toBe(1);
  const flagged = (await Clip.findByPk(copyId))!;
  expect(flagged.flagDetails.find((flag) => flag.flag === 'duplicate')?.matchClipId).toBe(processedId);

  const sorted = await Project.create({ name: 'Creek-side block', deltas: [1], ...settings });
  const row = { projectId: sorted.id, uploaderId: operator.id, site: 'Creek bend' };
  sortedProjectId = sorted.id;
  const sharpness = [140, 60, 90, 30, 120];
  const blurry = [];
  for (const [n, medianSharpness] of sharpness.entries()) {
    blurry.push({
      id: (await insertReviewClip({ ...row, originalName: `creek-${n}.mp4`, flags: ['blurry'], medianSharpness })).id,
      medianSharpness,
    });
    // Clips between them that the filter leaves out.
    await insertReviewClip({ ...row, originalName: `creek-sharp-${n}.mp4`, medianSharpness: medianSharpness + 5 });
  }
  blurrySharpestFirst = blurry.sort((a, b) => b.medianSharpness - a.medianSharpness).map((clip) => clip.id);

  const context = await browser.newContext({ viewport: VIEWPORT });
  page = await context.newPage();
  await signInThroughForm(page, server.baseUrl, curator.email, curator.password);
  await page.waitForSelector('[data-test="signed-in-user"]');
});
afterAll(async () => {
  await runtime?.close();
  await browser?.close();
  await server?.close();
  fs.rmSync(media, { recursive: true, force: true });
});

async function shownClip(id: number): Promise<void> {
  await page.waitForURL(new RegExp(`/review/${id}(\\?|$)`));
  await page.waitForSelector(`[data-test="review-clip"][data-clip-id="${id}"]`);
}

/** The element's box lies wholly inside the window, with the page scrolled to its top. */
async function expectInView(selector: string): Promise<void> {
  const box = await page.locator(selector).first().boundingBox();
  expect(box, selector).not.toBeNull();
  expect(box!.x, selector).toBeGreaterThanOrEqual(0);
  expect(box!.y, selector).toBeGreaterThanOrEqual(0);
  expect(box!.x + box!.width, selector).toBeLessThanOrEqual(VIEWPORT.width);
  expect(box!.y + box!.height, selector).toBeLessThanOrEqual(VIEWPORT.height);
}

describe('the review screen at 1440 × 900', () => {
  it('shows every piece of evidence without scrolling, and the keys change what is in view', async () => {
    await page.goto(`${server.baseUrl}/review/${processedId}`);
    await shownClip(processedId);
    await page.waitForSelector('[data-test="claim-mine"]');
    await page.waitForSelector('[data-test="signal-chart"] canvas');
    await page.waitForSelector('[data-test="motion-scale"]');
    const panels = ['preview', 'flags', 'signals', 'neighbours', 'views', 'frames'];
    for (const panel of panels) await expectInView(`[data-panel="${panel}"]`);
    for (const part of [
      'decision-bar',
      'review-preview',
      'neighbour-views',
      'frame-views',
      'motion-wheel-legend',
      'frame-strip',
      'signal-chart',
    ]) {
      await expectInView(`[data-test="${part}"]`);
    }
    // The keys act on what is in view: → selects frame 1 in the strip, M lays the motion over the frame.
    await page.keyboard.press('ArrowRight');
    await page.waitForSelector('[data-test="frame-strip"] button[aria-selected="true"][title^="frame 1 "]');
    await expectInView('[data-test="frame-strip"] button[aria-selected="true"]');
    await page.keyboard.press('m');
    await expectInView('[data-test="motion-overlay"]');
    expect(await page.evaluate(() => window.scrollY)).toBe(0);
    await screenshot(page, 'review-one-screen');
  });
});

describe('flow through the queue', () => {
  it('opens the next row of the sorted, filtered queue after a verdict, and undo brings the clip back', async () => {
    const query = `projectId=${sortedProjectId}&hasFlag=blurry&sort=-medianSharpness`;
    await page.goto(`${server.baseUrl}/review?${query}`);
    // The second row, not the head: "next" must follow the list from where the curator is.
    const [, second, third] = blurrySharpestFirst;
    await page.click(`[data-test="queue-open-${second}"]`);
    await shownClip(second!);
    await page.waitForSelector('[data-test="claim-mine"]');
    // The next row's evidence is drawn behind the clip on screen, out of sight and out of reach of keys and clicks;
    // the key shows that very element rather than building the next clip's screen.
    const ahead = page.locator(`[data-test="review-ahead"][data-clip-id="${third}"]`);
    await ahead.waitFor({ state: 'attached' });
    expect(await ahead.evaluate((element) => getComputedStyle(element).opacity)).toBe('0');
    expect(await ahead.evaluate((element) => (element as HTMLElement).inert)).toBe(true);
    await ahead.evaluate((element) => element.setAttribute('data-marked', 'drawn ahead'));
    await page.keyboard.press('a');
    await shownClip(third!);
    const shown = page.locator(`[data-test="review-evidence"][data-clip-id="${third}"]`);
    expect(await shown.getAttribute('data-marked')).toBe('drawn ahead');
    expect(await shown.evaluate((element) => getComputedStyle(element).opacity)).toBe('1');
    expect(await shown.evaluate((element) => (element as HTMLElement).inert)).toBe(false);
    expect(page.url()).toContain(query);
    // The address follows the screen once the clip is drawn, so the browser's back and forward step through clips.
    await page.goBack();
    await shownClip(second!);
    await page.goForward();
    await shownClip(third!);
    await page.waitForSelector('[data-test="undo-verdict"]');
    await expectInView('[data-test="undo-notice"]');
    expect((await Clip.findByPk(second))!.state).toBe('accepted');

    await page.keyboard.press('u');
    await shownClip(second!);
    await page.waitForSelector('[data-test="claim-mine"]');
    expect((await Clip.findByPk(second))!.state).toBe('awaiting_review');
    const events = await AuditEvent.findAll({ where: { targetType: 'clip', targetId: String(second) } });
    expect(events.map((event) => event.action)).toEqual(expect.arrayContaining(['clip.verdict', 'clip.verdict_undo']));
    await page.goto(`${server.baseUrl}/review?${query}`);
    await page.waitForSelector(`[data-test="queue-open-${second}"]`);
  });

  it('moves on before the verdict is recorded, shows one the server refuses and opens its clip again', async () => {
    const query = `projectId=${sortedProjectId}&hasFlag=blurry&sort=-medianSharpness`;
    const [, , third, fourth] = blurrySharpestFirst;
    const operator = (await User.findByEmail('operator@kinefold.test'))!;
    await page.goto(`${server.baseUrl}/review?${query}`);
    await page.click(`[data-test="queue-open-${third}"]`);
    await shownClip(third!);
    await page.waitForSelector('[data-test="claim-mine"]');
    // Someone else holds the clip by the time the verdict arrives: the server refuses it.
    await Clip.update(
      { claimedBy: operator.id, claimExpiresAt: new Date(Date.now() + 600_000) },
      { where: { id: third } },
    );
    await page.keyboard.press('a');
    await shownClip(fourth!);
    const refusal = `[data-test="refused-${third}"]`;
    await page.waitForSelector(refusal);
    await expectInView(refusal);
    const name = (await Clip.findByPk(third))!.originalName;
    expect(await page.textContent(refusal)).toContain(`Not recorded: Accept on ${name}.`);
    expect(await page.textContent(refusal)).toContain(`is claimed by ${operator.name}`);
    expect((await Clip.findByPk(third))!.state).toBe('awaiting_review');
    expect(await Verdict.count({ where: { clipId: third } })).toBe(0);

    // Their claim ends; the curator opens the clip from the notice and decides it again.
    await Clip.update({ claimedBy: null, claimExpiresAt: null }, { where: { id: third } });
    await page.click(`[data-test="refused-reopen-${third}"]`);
    await shownClip(third!);
    expect(await page.locator(refusal).count()).toBe(0);
    await page.waitForSelector('[data-test="claim-mine"]');
    await page.keyboard.press('a');
    await shownClip(fourth!);
    await expect.poll(async () => (await Clip.findByPk(third))!.state).toBe('accepted');
    await page.waitForSelector('[data-test="undo-verdict"]');
    await page.keyboard.press('u');
    await shownClip(third!);
    expect((await Clip.findByPk(third))!.state).toBe('awaiting_review');
  });
});

describe('the queue at 1440 × 900', () => {
  /** [scroll width, client width] of the page and of the table's scroller. */
  const widths = () =>
    page.evaluate(() => {
      const table = document.querySelector('[data-test="queue-table"]');
      return [
        document.documentElement.scrollWidth - document.documentElement.clientWidth,
        (table?.scrollWidth ?? 0) - (table?.clientWidth ?? 0),
      ];
    });

  it('needs no sideways scrolling, with rows of one line at either density', async () => {
    for (const [layout, tallest] of [
      ['', 56],
      ['compact', 36],
    ] as const) {
      await page.goto(`${server.baseUrl}/review${layout ? `?layout=${layout}` : ''}`);
      await page.waitForSelector(`[data-test="queue-open-${processedId}"]`);
      expect(await widths()).toEqual([0, 0]);
      const heights = await page
        .locator('[data-test="queue-table"] tbody tr')
        .evaluateAll((rows) => rows.map((row) => row.getBoundingClientRect().height));
      expect(heights.length).toBe(12);
      expect(Math.max(...heights), layout).toBeLessThanOrEqual(tallest);
      await screenshot(page, `review-queue-${layout || 'rows'}`);
    }
  });

  it("asks for the rows' pictures once the rows are on screen, in boxes that keep their size", async () => {
    await page.goto(`${server.baseUrl}/review`);
    const thumbnail = page.locator(`[data-test="queue-open-${processedId}"] [data-test="queue-thumbnail"]`);
    await thumbnail.waitFor();
    expect(await thumbnail.boundingBox()).toMatchObject({ width: 48, height: 27 });
    await expect.poll(() => thumbnail.getAttribute('src')).toBe(`/api/clips/${processedId}/thumbnail`);
    await expect
      .poll(() => thumbnail.evaluate((image: HTMLImageElement) => image.complete && image.naturalWidth > 0))
      .toBe(true);
    expect(await thumbnail.boundingBox()).toMatchObject({ width: 48, height: 27 });
  });

  it('sorts by a column from its header, turning the order round on a second click', async () => {
    // The blurry clips the tests before have left in the queue, sharpest first.
    const waiting = await Clip.findAll({ where: { id: blurrySharpestFirst, state: 'awaiting_review' } });
    const sharpestFirst = blurrySharpestFirst.filter((id) => waiting.some((clip) => clip.id === id));
    expect(sharpestFirst.length).toBeGreaterThan(1);
    await page.goto(`${server.baseUrl}/review?projectId=${sortedProjectId}&hasFlag=blurry`);
    await page.waitForSelector(`[data-test="queue-open-${sharpestFirst[0]}"]`);
    const header = page.locator('th', { has: page.locator('[data-test="queue-sort-medianSharpness"]') });
    const order = () =>
      page
        .locator('[data-test="queue-table"] [data-test^="queue-open-"]')
        .evaluateAll((links) => links.map((link) => Number(link.getAttribute('data-test')!.split('-').at(-1))));
    expect(await header.getAttribute('aria-sort')).toBe('none');
    await page.click('[data-test="queue-sort-medianSharpness"]');
    await page.waitForURL(/sort=medianSharpness/);
    expect(await header.getAttribute('aria-sort')).toBe('ascending');
    await expect.poll(order).toEqual([...sharpestFirst].reverse());
    await page.click('[data-test="queue-sort-medianSharpness"]');
    await page.waitForURL(/sort=-medianSharpness/);
    expect(await header.getAttribute('aria-sort')).toBe('descending');
    await expect.poll(order).toEqual(sharpestFirst);
  });

  it('pins the selection bar in view when a row near the bottom is picked', async () => {
    await page.goto(`${server.baseUrl}/review`);
    await page.waitForSelector(`[data-test="queue-open-${processedId}"]`);
    await page.locator('[data-test="queue-table"] tbody tr').last().locator('input[type="checkbox"]').click();
    await expectInView('[data-test="bulk-bar"]');
  });

  it('shows the queue as pictures that run through the clip under the pointer', async () => {
    await page.goto(`${server.baseUrl}/review?layout=grid`);
    const picture = page.locator(`[data-test="grid-picture-${processedId}"]`);
    await picture.waitFor();
    expect(await widths()).toEqual([0, 0]);
    expect(await picture.getAttribute('src')).toBe(`/api/clips/${processedId}/thumbnail`);
    const box = (await page.locator(`[data-test="grid-open-${processedId}"]`).boundingBox())!;
    // 15 frames across the picture: a pointer 70 % of the way across shows frame ⌊0.7 × 15⌋ = 10.
    await page.mouse.move(box.x + box.width * 0.7, box.y + box.height / 2);
    await expect.poll(() => picture.getAttribute('src')).toBe(`/api/clips/${processedId}/frames/10`);
    await screenshot(page, 'review-queue-grid');
  });
});

describe('a duplicate side by side', () => {
  it('shows both clips in step with their hash distance and rejects as a duplicate in one action', async () => {
    await page.goto(`${server.baseUrl}/review/${copyId}`);
    await shownClip(copyId);
    await page.waitForSelector('[data-test="claim-mine"]');
    await page.keyboard.press('d');
    await page.waitForSelector('[data-test="compare-summary"]');
    // The copy is the same footage: every one of its 15 frames has a partner within the threshold.
    expect(await page.textContent('[data-test="compare-summary"]')).toContain('15 of 15 frames lie within 5');
    for (const side of ['compare-this', 'compare-other']) {
      const loaded = await page
        .locator(`[data-test="${side}"] img`)
        .evaluate((image: HTMLImageElement) => image.complete && image.naturalWidth > 0);
      expect(loaded, side).toBe(true);
    }
    expect(await page.getAttribute('[data-test="compare-other"] img', 'src')).toBe(
      `/api/clips/${processedId}/frames/0`,
    );
    await page.keyboard.press('ArrowRight');
    await expect
      .poll(() => page.getAttribute('[data-test="compare-other"] img', 'src'))
      .toBe(`/api/clips/${processedId}/frames/1`);
    expect(await page.textContent('[data-test="compare-distance"]')).toContain('near-identical');
    await screenshot(page, 'review-duplicate-compare');
    await page.click('[data-test="reject-duplicate"]');
    await page.waitForURL((url) => !url.pathname.endsWith(`/review/${copyId}`));
    // The verdict is sent behind the next clip, so it is recorded shortly after the screen moves on.
    await expect.poll(async () => (await Clip.findByPk(copyId))!.state).toBe('rejected');
    const verdict = await Verdict.findOne({ where: { clipId: copyId, supersededAt: null } });
    expect([verdict!.reason, verdict!.comment]).toEqual([
      'duplicate',
      `Duplicate of clip ${processedId} (terrace-row-4.mp4).`,
    ]);
  });
});
