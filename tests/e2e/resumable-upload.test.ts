import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, Project } from '../../server/core/models';
import { storagePaths } from '../../server/core/storage/paths';
import { launchBrowser, screenshot, signedInAsDemo } from '../helpers/browser';
import { ffmpegMake } from '../helpers/media-fixtures';
import { startRunningServer, type RunningServer } from '../helpers/running-server';

let server: RunningServer;
let browser: Browser;
let file: string;
let secondFile: string;
const media = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-e2e-resume-'));
/** Upload speed the browser is held to, so the test can see the upload half done (bytes per second). */
const UPLOAD_BYTES_PER_S = 4 * 1024 * 1024;

beforeAll(async () => {
  server = await startRunningServer();
  browser = await launchBrowser();
  await Project.create({
    name: 'Ridge line survey',
    estimator: 'farneback',
    estimatorParams: {},
    sampleFps: 5,
    workingSize: 320,
    deltas: [1],
    flagThresholds: {},
  });
  file = await noisyClip('ridge-pass.mp4', 1);
  secondFile = await noisyClip('ridge-return.mp4', 2);
}, 60_000);
afterAll(async () => {
  await browser?.close();
  await server?.close();
  fs.rmSync(media, { recursive: true, force: true });
});

/** Lossless H.264 of a noisy test pattern: about 20 MB from two seconds, big enough to be caught half sent. */
function noisyClip(name: string, seed: number): Promise<string> {
  return ffmpegMake(path.join(media, name), [
    '-f',
    'lavfi',
    '-i',
    'testsrc2=size=640x360:rate=25:duration=2',
    '-vf',
    `noise=alls=60:allf=t:all_seed=${seed}`,
    '-c:v',
    'libx264',
    '-preset',
    'ultrafast',
    '-qp',
    '0',
    '-pix_fmt',
    'yuv420p',
  ]);
}

/** Holds the page's uploads to UPLOAD_BYTES_PER_S through the browser's own network emulation. */
async function slowUploads(page: Page): Promise<void> {
  const network = await page.context().newCDPSession(page);
  await network.send('Network.enable');
  await network.send('Network.emulateNetworkConditions', {
    offline: false,
    latency: 0,
    downloadThroughput: -1,
    uploadThroughput: UPLOAD_BYTES_PER_S,
  });
}

/** What the page asks of the resumable route: each creation, and the offset each PATCH starts from. */
function watchUploads(page: Page): { creations: string[]; patchOffsets: number[] } {
  const seen = { creations: [] as string[], patchOffsets: [] as number[] };
  page.on('request', (request) => {
    if (!request.url().includes('/api/clips/resumable')) return;
    if (request.method() === 'POST') seen.creations.push(request.url());
    if (request.method() === 'PATCH') seen.patchOffsets.push(Number(request.headers()['upload-offset']));
  });
  return seen;
}

async function expectStoredAs(name: string, source: string): Promise<void> {
  const expected = createHash('sha256').update(fs.readFileSync(source)).digest('hex');
  const clip = await Clip.findOne({ where: { originalName: name } });
  expect(clip!.sha256).toBe(expected);
  expect(clip!.site).toBe('North ridge, marker 3');
  const stored = fs.readFileSync(storagePaths(server.storageDir).clipSource(clip!.id, clip!.sourceExt));
  expect(createHash('sha256').update(stored).digest('hex')).toBe(expected);
}

/** Bytes of the one resumable upload the server holds so far (0 before it exists). */
function bytesOnServer(): number {
  const dir = storagePaths(server.storageDir).resumableDir;
  const data = fs.existsSync(dir) ? fs.readdirSync(dir).filter((name) => !name.endsWith('.json')) : [];
  return data.length === 1 ? fs.statSync(path.join(dir, data[0]!)).size : 0;
}

async function chooseProjectAndFile(page: Page, chosen: string): Promise<void> {
  await page.click('[data-test="nav-upload"]');
  await page.waitForSelector('[data-test="privacy-notice"]');
  await page.click('[data-test="upload-project"]');
  await page.click('li[role="option"]:has-text("Ridge line survey")');
  await page.fill('#capture-site', 'North ridge, marker 3');
  await page.setInputFiles('input[type="file"]', [chosen]);
}

/** Starts the batch; it has no capture time, so the screen asks once and the test goes on without one. */
async function startWithoutCaptureTime(page: Page): Promise<void> {
  await page.click('[data-test="upload-start"]');
  await page.click('.p-confirmdialog-accept-button');
}

describe('an upload over a connection that breaks', () => {
  it('resumes from where the connection was cut at about half and lands with the same SHA-256', async () => {
    const size = fs.statSync(file).size;
    const page = await signedInAsDemo(browser, server.baseUrl, 'operator');
    await slowUploads(page);
    const { creations, patchOffsets } = watchUploads(page);

    await chooseProjectAndFile(page, file);
    await startWithoutCaptureTime(page);
    await expect.poll(bytesOnServer, { timeout: 30_000, interval: 50 }).toBeGreaterThanOrEqual(size * 0.45);
    const heldAtCut = bytesOnServer();
    expect(heldAtCut).toBeLessThan(size);
    server.cutConnections();

    await page.waitForSelector('[data-test="upload-state-ridge-pass.mp4"]:has-text("created")', { timeout: 60_000 });
    await screenshot(page, 'upload-resumed');
    // One upload, continued: a second PATCH starts at or after the offset the server held when the line broke.
    expect(creations).toHaveLength(1);
    expect(patchOffsets[0]).toBe(0);
    expect(Math.max(...patchOffsets.slice(1))).toBeGreaterThanOrEqual(heldAtCut);
    await expectStoredAs('ridge-pass.mp4', file);
    await page.context().close();
  });

  it('carries on after a reload when the same file is chosen again with the same metadata', async () => {
    const size = fs.statSync(secondFile).size;
    const page = await signedInAsDemo(browser, server.baseUrl, 'operator');
    await slowUploads(page);
    const { creations, patchOffsets } = watchUploads(page);
    await chooseProjectAndFile(page, secondFile);
    await startWithoutCaptureTime(page);
    await expect.poll(bytesOnServer, { timeout: 30_000, interval: 50 }).toBeGreaterThanOrEqual(size * 0.3);
    await page.reload();
    const heldAtReload = bytesOnServer();
    expect(heldAtReload).toBeLessThan(size);

    await chooseProjectAndFile(page, secondFile);
    await startWithoutCaptureTime(page);
    await page.waitForSelector('[data-test="upload-state-ridge-return.mp4"]:has-text("created")', { timeout: 60_000 });
    expect(creations).toHaveLength(1);
    expect(Math.max(...patchOffsets.slice(1))).toBeGreaterThanOrEqual(heldAtReload);
    await expectStoredAs('ridge-return.mp4', secondFile);
    await page.context().close();
  });
});
