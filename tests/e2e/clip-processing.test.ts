import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Project, User } from '../../server/core/models';
import { admitUpload } from '../../server/core/clips/clip-admission';
import { reserveUpload } from '../../server/core/usage/quotas';
import { storagePaths } from '../../server/core/storage/paths';
import { DEMO_ACCOUNTS } from '../../server/core/people/demo-accounts';
import { launchBrowser, screenshot, signInThroughForm } from '../helpers/browser';
import { makeTestClip } from '../helpers/media-fixtures';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { startRunningServer, type RunningServer } from '../helpers/running-server';
import { createFolderStore } from '../../server/core/storage/folder-store';

let server: RunningServer;
let browser: Browser;
let runtime: TestRuntime;
let clipId: number;
const media = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-e2e-processing-'));

/** Puts a generated clip through the same admission an upload goes through, then lets the real worker runtime run. */
beforeAll(async () => {
  server = await startRunningServer();
  browser = await launchBrowser();
  runtime = startTestRuntime(server);
  const project = await Project.create({
    name: 'Creek-side block',
    estimator: 'farneback',
    estimatorParams: {},
    sampleFps: 5,
    workingSize: 320,
    deltas: [1, 2],
    flagThresholds: {},
  });
  const operator = (await User.findByEmail('operator@kinefold.test'))!;
  const file = await makeTestClip(media, 'creek-pass.mp4', { seconds: 4, size: '480x270', seed: 6 });
  const incoming = path.join(storagePaths(server.storageDir).incomingDir, 'creek-pass.part');
  fs.mkdirSync(path.dirname(incoming), { recursive: true });
  fs.copyFileSync(file, incoming);
  const reservationId = await reserveUpload(project.id, operator.id, fs.statSync(incoming).size);
  const clip = await admitUpload(
    {
      path: incoming,
      size: fs.statSync(incoming).size,
      reservationId,
      sha256: createHash('sha256').update(fs.readFileSync(incoming)).digest('hex'),
      fields: { projectId: project.id, site: 'Creek bank', rig: 'handheld', capturedAt: null, tags: [], notes: '' },
    },
    'creek-pass.mp4',
    operator.id,
    { store: createFolderStore(server.storageDir), publicUrl: server.config.publicUrl },
  );
  clipId = clip.id;
  expect(await runtime.drain()).toBe(1);
});
afterAll(async () => {
  await runtime?.close();
  await browser?.close();
  await server?.close();
  fs.rmSync(media, { recursive: true, force: true });
});

describe('a processed clip', () => {
  it('shows frames, views, signals and flags, and its preview plays in Chromium', async () => {
    const curator = DEMO_ACCOUNTS.find((account) => account.role === 'curator')!;
    const page = await browser.newPage({ viewport: { width: 1440, height: 1200 } });
    await signInThroughForm(page, server.baseUrl, curator.email, curator.password);
    await page.waitForSelector('[data-test="home-curator"]');
    await page.goto(`${server.baseUrl}/clips/${clipId}`);
    await page.waitForSelector('[data-test="frame-strip"] img');
    expect(await page.$$eval('[data-test="frame-strip"] button', (frames) => frames.length)).toBe(20);
    await page.waitForSelector('[data-test="signal-chart"] canvas');
    await page.click('[data-test="frame-strip"] button:nth-child(6)');
    await page.waitForFunction(() =>
      [...document.querySelectorAll('[data-test="frame-views"] img')].every(
        (image) => (image as HTMLImageElement).complete && (image as HTMLImageElement).naturalWidth > 0,
      ),
    );
    const views = await page.$$eval('[data-test="frame-views"] img', (images) =>
      images.map((image) => (image as HTMLImageElement).naturalWidth),
    );
    // Frame, luma, chroma and the motion picture of the field to the next frame.
    expect(views).toEqual([320, 320, 320, 320]);
    expect(
      await page.$$eval('[data-test="frame-strip"] [data-test="strip-motion"]', (pictures) => pictures.length),
    ).toBeGreaterThan(0);
    await page.waitForSelector('[data-test="motion-wheel-legend"] canvas');

    const played = await page.$eval('[data-test="clip-preview"]', async (element) => {
      const video = element as HTMLVideoElement;
      video.muted = true;
      await video.play();
      await new Promise((resolve) => setTimeout(resolve, 800));
      return { time: video.currentTime, width: video.videoWidth, error: video.error?.code ?? null };
    });
    expect(played.error).toBeNull();
    expect(played.width).toBe(320);
    expect(played.time).toBeGreaterThan(0.2);
    await screenshot(page, 'curator-clip-detail');
    await page.close();
  });
});
