import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { formatBytes } from '../../shared/format-bytes';
import type { PairsetManifest } from '../../shared/types/pairsets';
import { Clip, Pairset, User, Verdict } from '../../server/core/models';
import { DEMO_ACCOUNTS } from '../../server/core/people/demo-accounts';
import { createProject } from '../../server/core/projects/projects';
import { launchBrowser, screenshot, signedInAsDemo } from '../helpers/browser';
import { makeTestClip } from '../helpers/media-fixtures';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { startRunningServer, type RunningServer } from '../helpers/running-server';

let server: RunningServer;
let browser: Browser;
let runtime: TestRuntime;
const media = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-e2e-journey-'));
const PROJECT = 'Lower terrace, first pass';
const CLIP = 'lower-terrace-row-7.mp4';
const account = (role: string) => DEMO_ACCOUNTS.find((candidate) => candidate.role === role)!;

/** A project at a new project's defaults (the dis estimator among them); the clip is ffmpeg's moving test pattern. */
beforeAll(async () => {
  server = await startRunningServer();
  browser = await launchBrowser();
  runtime = startTestRuntime(server);
  const admin = (await User.findByEmail('admin@kinefold.test'))!;
  await createProject({ name: PROJECT }, admin.id);
  await makeTestClip(media, CLIP, { seconds: 3, size: '320x180', seed: 2 });
});
afterAll(async () => {
  await runtime?.close();
  await browser?.close();
  await server?.close();
  fs.rmSync(media, { recursive: true, force: true });
});

describe('one clip through all four roles', () => {
  it('is uploaded, processed, accepted by keyboard, built into a pairset, fetched by token and counted', async () => {
    // Operator: upload with capture metadata.
    const operator = await signedInAsDemo(browser, server.baseUrl, 'operator');
    await operator.click('[data-test="nav-upload"]');
    await operator.click('[data-test="upload-project"]');
    await operator.click(`li[role="option"]:has-text("${PROJECT}")`);
    await operator.fill('#capture-site', 'Lower terrace');
    await operator.fill('#capture-rig', 'tractor mount');
    await operator.setInputFiles('input[type="file"]', [path.join(media, CLIP)]);
    await operator.click('[data-test="upload-start"]');
    await operator.click('.p-confirmdialog-accept-button');
    await operator.waitForSelector(`[data-test="upload-state-${CLIP}"]:has-text("created")`);
    const clip = (await Clip.findOne({ where: { originalName: CLIP } }))!;
    expect(clip.state).toBe('queued');

    // Worker: the real job runtime processes it to the review queue.
    expect(await runtime.drain()).toBe(1);
    await clip.reload();
    expect([clip.state, clip.frameCount]).toEqual(['awaiting_review', 15]);
    await operator.click('[data-test="nav-clips"]');
    await operator.waitForSelector('[data-test="clips-table"] :text("awaiting review")');
    await operator.context().close();

    // Curator: open it from the queue and accept it with the A key.
    const curator = await signedInAsDemo(browser, server.baseUrl, 'curator');
    await curator.click('[data-test="nav-review-queue"]');
    await curator.click(`[data-test="queue-open-${clip.id}"]`);
    await curator.waitForSelector(`[data-test="review-clip"][data-clip-id="${clip.id}"]`);
    await curator.waitForSelector('[data-test="claim-mine"]');
    await curator.waitForSelector('[data-test="frame-strip"] img');
    await curator.keyboard.press('a');
    await expect.poll(async () => (await Clip.findByPk(clip.id))!.state).toBe('accepted');
    const curatorUser = (await User.findByEmail(account('curator').email))!;
    expect((await Verdict.findOne({ where: { clipId: clip.id } }))!.curatorId).toBe(curatorUser.id);
    await curator.context().close();

    // Engineer: define and build a pairset over the project with the form's views (frame, neighbour at Δ 1 and 2,
    // motion; core graph). 15 frames give frame~neighbour+1 14 pairs, frame~neighbour+2 13 and frame~motion 14.
    const engineer = await signedInAsDemo(browser, server.baseUrl, 'engineer');
    await engineer.click('[data-test="nav-pairsets"]');
    await engineer.click('[data-test="pairset-new"]');
    await engineer.fill('[data-test="pairset-name"]', 'Lower terrace neighbours');
    await engineer.click('[data-test="pairset-projects"]');
    await engineer.click(`li[role="option"]:has-text("${PROJECT}")`);
    await engineer.keyboard.press('Escape');
    await engineer.waitForFunction(() =>
      document.querySelector('[data-test="counts-clips"]')?.textContent?.trim().startsWith('1 '),
    );
    await engineer.click('[data-test="pairset-create"]');
    await engineer.waitForSelector('[data-test="pairset-detail"]');
    await engineer.click('[data-test="pairset-build"]');
    await engineer.waitForSelector('[data-test="pairset-progress"]');
    const pairsetId = Number(new URL(engineer.url()).pathname.split('/').at(-1));
    expect(await runtime.drain()).toBe(1);
    await engineer.waitForFunction(
      () => document.querySelector('[data-test="pairset-state"]')?.textContent === 'built',
      undefined,
      { timeout: 30_000 },
    );

    // ... then a script on a training machine: a token made once on the tokens screen, then plain HTTP.
    await engineer.click('[data-test="nav-api-tokens"]');
    await engineer.fill('[data-test="token-name"]', 'training-rig-2');
    await engineer.click('[data-test="token-create"]');
    const token = (await (await engineer.waitForSelector('[data-test="token-value"]')).textContent())!.trim();
    await engineer.context().close();
    const authorised = { headers: { Authorization: `Bearer ${token}` } };
    const manifest = (await (
      await fetch(`${server.baseUrl}/api/pairsets/${pairsetId}/manifest`, authorised)
    ).json()) as PairsetManifest;
    expect(manifest.statistics.pairs.total).toBe(14 + 13 + 14);
    const shard = await fetch(`${server.baseUrl}/api/pairsets/${pairsetId}/shards/0`, authorised);
    expect(shard.status).toBe(200);
    const bytes = Buffer.from(await shard.arrayBuffer());
    expect(bytes.length).toBe(manifest.shards[0]!.bytes);
    expect(createHash('sha256').update(bytes).digest('hex')).toBe(manifest.shards[0]!.sha256);

    // Admin: the storage screen counts the clip's bytes on the project and the pairset's on the engineer.
    const pairset = (await Pairset.findByPk(pairsetId))!;
    expect(pairset.bytes).toBeGreaterThan(0);
    await clip.reload();
    const admin = await signedInAsDemo(browser, server.baseUrl, 'admin');
    await admin.click('[data-test="nav-admin-usage"]');
    await admin.waitForSelector('[data-test="usage"]');
    const row = (name: string) => admin.locator('tr', { hasText: name }).first().textContent();
    expect(await row(PROJECT)).toContain(formatBytes(clip.storedBytes));
    expect(await row(account('engineer').name)).toContain(formatBytes(pairset.bytes));
    await screenshot(admin, 'journey-admin-usage');
    await admin.context().close();
  });
});
