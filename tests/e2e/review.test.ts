import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, MotionField, Project, User, Verdict } from '../../server/core/models';
import { DEMO_ACCOUNTS } from '../../server/core/people/demo-accounts';
import { launchBrowser, screenshot, signInThroughForm } from '../helpers/browser';
import { makeTestClip } from '../helpers/media-fixtures';
import { insertClip } from '../helpers/pipeline-clips';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { insertReviewClip } from '../helpers/review-clips';
import { startRunningServer, type RunningServer } from '../helpers/running-server';
import { addUser, TEST_PASSWORD } from '../helpers/test-server';

let server: RunningServer;
let browser: Browser;
let runtime: TestRuntime;
let curatorContext: BrowserContext;
let secondContext: BrowserContext;
let curatorPage: Page;
let secondPage: Page;
const media = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-e2e-review-'));
const curator = DEMO_ACCOUNTS.find((account) => account.role === 'curator')!;
const clips: Record<string, number> = {};

async function signedInPage(context: BrowserContext, email: string, password: string): Promise<Page> {
  const page = await context.newPage();
  await signInThroughForm(page, server.baseUrl, email, password);
  await page.waitForSelector('[data-test="signed-in-user"]');
  return page;
}

/** The clip the review screen shows now, once its page has loaded. */
async function shownClip(page: Page, id: number): Promise<void> {
  await page.waitForURL(new RegExp(`/review/${id}(\\?|$)`));
  await page.waitForSelector(`[data-test="review-clip"][data-clip-id="${id}"]`);
}

/**
 * Three clips for the keyboard journey (one processed by the real worker runtime, so it has frames, motion and a
 * preview, and two written as the pipeline leaves them) and three flagged dark for the bulk rejection.
 */
beforeAll(async () => {
  server = await startRunningServer();
  browser = await launchBrowser();
  runtime = startTestRuntime(server);
  const operator = (await User.findByEmail('operator@kinefold.test'))!;
  await addUser(server, 'curator', 'second-curator@example.test');
  await User.update({ name: 'Oda Lindqvist' }, { where: { email: 'second-curator@example.test' } });
  const project = await Project.create({
    name: 'Orchard rows',
    estimator: 'farneback',
    estimatorParams: {},
    sampleFps: 5,
    workingSize: 320,
    deltas: [1, 2],
    flagThresholds: {},
  });
  const file = await makeTestClip(media, 'orchard-row-1.mp4', { seconds: 3, size: '320x180', seed: 4 });
  clips.processed = (await insertClip(server, file, project.id, operator.id)).clip.id;
  expect(await runtime.drain()).toBe(1);
  const processed = (await Clip.findByPk(clips.processed))!;
  expect([processed.state, processed.frameCount, processed.cutCount]).toEqual(['awaiting_review', 15, 0]);
  // The flags stage wrote the review signals: 15 frames and no cut give 14 pairs at Δ = 1 and 13 at Δ = 2 (no
  // pair spans a cut or runs past the end), and the motion figures are the means over the forward fields.
  expect(processed.usablePairs).toBe(14 + 13);
  const fields = await MotionField.forwardOfClip(processed.id);
  expect(fields.length).toBeGreaterThan(0);
  const mean = (values: number[]) => values.reduce((a, b) => a + b, 0) / values.length;
  expect(processed.meanMotion).toBeCloseTo(mean(fields.map((field) => field.meanMagnitude)), 9);
  expect(processed.consistentShare).toBeCloseTo(mean(fields.map((field) => field.consistentShare)), 9);
  const row = { projectId: project.id, uploaderId: operator.id, site: 'Orchard' };
  clips.second = (await insertReviewClip({ ...row, originalName: 'orchard-row-2.mp4' })).id;
  clips.third = (await insertReviewClip({ ...row, originalName: 'orchard-row-3.mp4' })).id;
  for (const n of [1, 2, 3]) {
    clips[`dark${n}`] = (
      await insertReviewClip({ ...row, originalName: `cellar-${n}.mp4`, flags: ['dark'], meanLuma: 12 })
    ).id;
  }
  curatorContext = await browser.newContext({ viewport: { width: 1440, height: 1000 } });
  secondContext = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  curatorPage = await signedInPage(curatorContext, curator.email, curator.password);
  secondPage = await signedInPage(secondContext, 'second-curator@example.test', TEST_PASSWORD);
});
afterAll(async () => {
  await curatorContext?.close();
  await secondContext?.close();
  await runtime?.close();
  await browser?.close();
  await server?.close();
  fs.rmSync(media, { recursive: true, force: true });
});

describe('the review queue and screen', () => {
  it('lets a curator work three clips with the keyboard only, while a second curator sees the claim', async () => {
    const page = curatorPage;
    // The queue without the dark clips: the processed clip was uploaded first, so it comes first.
    await page.goto(`${server.baseUrl}/review?lacksFlag=dark`);
    await page.waitForSelector(`[data-test="queue-open-${clips.processed}"]`);
    await page.click(`[data-test="queue-open-${clips.processed}"]`);
    await shownClip(page, clips.processed!);
    await page.waitForSelector('[data-test="claim-mine"]');
    await page.waitForSelector('[data-test="frame-strip"] img');

    // Frames step with the arrows; M lays the motion picture over the frame.
    await page.keyboard.press('ArrowRight');
    await page.keyboard.press('ArrowRight');
    await page.waitForSelector('[data-test="frame-strip"] button[aria-selected="true"][title^="frame 2 "]');
    await page.keyboard.press('m');
    await page.waitForSelector('[data-test="motion-overlay"]');
    await page.keyboard.press('?');
    await page.waitForSelector('[data-test="key-help"]');
    expect(await page.textContent('[data-test="key-help"]')).toContain('Reject: show the numbered reasons');
    await screenshot(page, 'review-clip-keys');
    await page.keyboard.press('Escape');
    await page.waitForSelector('[data-test="key-help"]', { state: 'detached' });

    // A accepts and opens the next clip, which the curator now holds.
    await page.keyboard.press('a');
    await shownClip(page, clips.second!);
    await page.waitForSelector('[data-test="claim-mine"]');

    // Meanwhile a second curator opens the same clip: they see who holds it and cannot decide it.
    await secondPage.goto(`${server.baseUrl}/review/${clips.second}`);
    await secondPage.waitForSelector('[data-test="claim-held"]');
    expect(await secondPage.textContent('[data-test="claim-held"]')).toContain(`${curator.name} holds this clip`);
    expect(await secondPage.isDisabled('[data-test="decide-accept"]')).toBe(true);
    await screenshot(secondPage, 'review-claim-held');
    await secondPage.goto(`${server.baseUrl}/review`);
    await secondPage.waitForSelector(`[data-test="queue-open-${clips.second}"]`);
    const heldRow = secondPage.locator('tr', { has: secondPage.locator(`[data-test="queue-open-${clips.second}"]`) });
    expect(await heldRow.locator('[data-test="queue-held"]').textContent()).toBe(`held by ${curator.name}`);

    // R shows the numbered reasons; 3 rejects with the third (Blurry) and opens the next clip.
    await page.keyboard.press('c');
    await page.keyboard.type('soft focus all through');
    await page.keyboard.press('Enter');
    await page.keyboard.press('r');
    await page.waitForSelector('[data-test="reject-reasons"]');
    await page.keyboard.press('3');
    await shownClip(page, clips.third!);

    // N leaves the third clip undecided; nothing else waits under this filter, so the queue comes back.
    await page.keyboard.press('n');
    await page.waitForURL(/\/review\?lacksFlag=dark$/);

    const states = await Clip.findAll({
      where: { id: [clips.processed!, clips.second!, clips.third!] },
      order: [['id', 'ASC']],
    });
    expect(states.map((clip) => clip.state)).toEqual(['accepted', 'rejected', 'awaiting_review']);
    const rejection = await Verdict.findOne({ where: { clipId: clips.second } });
    expect([rejection!.reason, rejection!.comment]).toEqual(['blurry', 'soft focus all through']);
    // Leaving the third clip lets go of its claim (the screen sends the release as it closes).
    await expect.poll(async () => (await Clip.findByPk(clips.third))!.claimedBy).toBeNull();
  });

  it('bulk-rejects every clip flagged dark, skipping the one another curator holds', async () => {
    await secondPage.goto(`${server.baseUrl}/review/${clips.dark3}`);
    await secondPage.waitForSelector('[data-test="claim-mine"]');

    const page = curatorPage;
    await page.goto(`${server.baseUrl}/review?hasFlag=dark`);
    await page.waitForSelector(`[data-test="queue-open-${clips.dark3}"]`);
    expect(await page.locator('[data-test="queue-table"] tbody tr').count()).toBe(3);
    await page.click('[data-test="queue-pick-page"]');
    await page.waitForSelector('[data-test="bulk-bar"]');
    await page.click('[data-test="bulk-reject"]');
    await page.waitForSelector('[data-test="bulk-dialog"]');
    expect(await page.textContent('[data-test="bulk-count"]')).toContain('Reject 3 clips selected');
    await page.click('[data-test="bulk-reason"]');
    await page.click('li[role="option"]:has-text("Too dark")');
    await page.click('[data-test="bulk-confirm"]');
    await page.waitForSelector('[data-test="bulk-summary"]');
    expect(await page.textContent('[data-test="bulk-summary"]')).toContain('Rejected 2; skipped 1');
    expect(await page.textContent('[data-test="bulk-skipped"]')).toContain(
      `clip ${clips.dark3}: claimed by Oda Lindqvist`,
    );
    await screenshot(page, 'review-bulk-result');
    await page.click('[data-test="bulk-close"]');
    await page.waitForSelector('[data-test="bulk-dialog"]', { state: 'detached' });

    const dark = await Clip.findAll({
      where: { id: [clips.dark1!, clips.dark2!, clips.dark3!] },
      order: [['id', 'ASC']],
    });
    expect(dark.map((clip) => clip.state)).toEqual(['rejected', 'rejected', 'awaiting_review']);
    const verdicts = await Verdict.findAll({ where: { clipId: [clips.dark1!, clips.dark2!] } });
    expect(verdicts.map((verdict) => [verdict.reason, verdict.bulk])).toEqual([
      ['too-dark', true],
      ['too-dark', true],
    ]);
    // The queue under the same filter now holds only the clip that was skipped.
    await page.waitForFunction(() => document.querySelectorAll('[data-test="queue-table"] tbody tr').length === 1);
    await screenshot(page, 'review-queue');
  });
});
