import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { admitUpload } from '../../server/core/clips/clip-admission';
import { Project, User } from '../../server/core/models';
import { createFolderStore } from '../../server/core/storage/folder-store';
import { storagePaths } from '../../server/core/storage/paths';
import { reserveUpload } from '../../server/core/usage/quotas';
import type { Role } from '../../shared/roles';
import { launchBrowser, screenshot, signedInAsDemo } from '../helpers/browser';
import { makeTestClip } from '../helpers/media-fixtures';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { startRunningServer, type RunningServer } from '../helpers/running-server';
import { horizontalOverflow, seriousAxeFindings } from './screen-checks';

/**
 * Every main screen on a phone (390×844) and a tablet (768×1024): nothing reaches past the window's right edge,
 * and axe-core finds no serious or critical WCAG 2.1 A/AA violation. One processed clip and one still queued give
 * the clip pages both states.
 */
let server: RunningServer;
let browser: Browser;
let runtime: TestRuntime;
let processedClipId: number;
let queuedClipId: number;
const media = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-e2e-fit-'));

async function admit(projectId: number, uploaderId: number, name: string, seed: number): Promise<number> {
  const file = await makeTestClip(media, name, { seconds: 2, size: '480x270', seed });
  const incoming = path.join(storagePaths(server.storageDir).incomingDir, `${name}.part`);
  fs.mkdirSync(path.dirname(incoming), { recursive: true });
  fs.copyFileSync(file, incoming);
  const size = fs.statSync(incoming).size;
  const clip = await admitUpload(
    {
      path: incoming,
      size,
      reservationId: await reserveUpload(projectId, uploaderId, size),
      sha256: createHash('sha256').update(fs.readFileSync(incoming)).digest('hex'),
      fields: { projectId, site: 'Ridge path', rig: 'handheld', capturedAt: null, tags: ['dusk'], notes: '' },
    },
    name,
    uploaderId,
    { store: createFolderStore(server.storageDir), publicUrl: server.config.publicUrl },
  );
  return clip.id;
}

beforeAll(async () => {
  server = await startRunningServer();
  browser = await launchBrowser();
  runtime = startTestRuntime(server);
  const project = await Project.create({
    name: 'Ridge survey',
    estimator: 'farneback',
    estimatorParams: {},
    sampleFps: 5,
    workingSize: 320,
    deltas: [1],
    flagThresholds: {},
  });
  const operator = (await User.findByEmail('operator@kinefold.test'))!;
  processedClipId = await admit(project.id, operator.id, 'ridge-pass.mp4', 3);
  await runtime.drain();
  queuedClipId = await admit(project.id, operator.id, 'ridge-return.mp4', 4);
});
afterAll(async () => {
  await runtime?.close();
  await browser?.close();
  await server?.close();
  fs.rmSync(media, { recursive: true, force: true });
});

/** Each main screen, with the role that opens it and what shows once it has loaded. */
const SCREENS: { role: Role; path: () => string; ready: string }[] = [
  { role: 'operator', path: () => '/', ready: '[data-test="home-operator"]' },
  { role: 'operator', path: () => '/upload', ready: '[data-test="upload-project"]' },
  { role: 'operator', path: () => '/clips', ready: '[data-test="clips-table"] tbody tr' },
  { role: 'operator', path: () => `/clips/${processedClipId}`, ready: '[data-test="signal-chart"] canvas' },
  { role: 'operator', path: () => `/clips/${queuedClipId}`, ready: '[data-test="clip-processing"]' },
  { role: 'operator', path: () => '/projects', ready: '[data-test="projects-table"] tbody tr' },
  { role: 'operator', path: () => '/profile', ready: '[data-test="profile"]' },
  { role: 'curator', path: () => '/', ready: '[data-test="home-curator"]' },
  { role: 'curator', path: () => '/review', ready: '[data-test="queue-layout"]' },
  { role: 'curator', path: () => `/review/${processedClipId}`, ready: '[data-test="frame-strip"] img' },
  { role: 'engineer', path: () => '/', ready: '[data-test="home-engineer"]' },
  { role: 'engineer', path: () => '/pairsets', ready: '[data-test="pairsets-table"]' },
  { role: 'engineer', path: () => '/pairsets/new', ready: '[data-test="pairset-form"]' },
  { role: 'engineer', path: () => '/api-tokens', ready: '[data-test="tokens-table"]' },
  { role: 'admin', path: () => '/', ready: '[data-test="home-admin"]' },
  { role: 'admin', path: () => '/people', ready: '[data-test="people-table"] tbody tr' },
  { role: 'admin', path: () => '/admin/usage', ready: '[data-test="usage"]' },
  { role: 'admin', path: () => '/admin/jobs', ready: '[data-test="jobs-table"] tbody tr' },
  { role: 'admin', path: () => '/admin/audit', ready: '[data-test="audit-table"] tbody tr' },
  { role: 'admin', path: () => '/admin/settings', ready: '[data-test="settings"]' },
  { role: 'admin', path: () => '/api-tokens', ready: '[data-test="all-tokens-table"]' },
  { role: 'admin', path: () => '/mail', ready: '[data-test="mail-table"]' },
];

const SIZES = [
  { name: 'phone', width: 390, height: 844 },
  { name: 'tablet', width: 768, height: 1024 },
];

async function expectFits(page: Page, where: string): Promise<void> {
  expect.soft(await horizontalOverflow(page), `${where} scrolls sideways`).toEqual({ by: 0, widest: [] });
  expect.soft(await seriousAxeFindings(page), `${where} accessibility`).toEqual([]);
}

describe.each(SIZES)('every main screen at $width×$height', (size) => {
  it('the sign-in page fits and passes the accessibility check', async () => {
    const page = await browser.newPage({ viewport: size });
    await page.goto(`${server.baseUrl}/sign-in`);
    await page.waitForSelector('#sign-in-email');
    const formWidth = await page.$eval('.kf-sign-in__form', (form) => form.getBoundingClientRect().width);
    expect(formWidth).toBeGreaterThan(Math.min(size.width * 0.8, 300));
    await expectFits(page, 'sign-in');
    await page.close();
  });

  for (const role of ['operator', 'curator', 'engineer', 'admin'] as const) {
    it(`${role}'s screens fit and pass the accessibility check`, async () => {
      const page = await signedInAsDemo(browser, server.baseUrl, role, size);
      for (const screen of SCREENS.filter((candidate) => candidate.role === role)) {
        await page.goto(`${server.baseUrl}${screen.path()}`);
        await page.waitForSelector(screen.ready);
        await expectFits(page, screen.path());
        if (size.name === 'phone') await screenshot(page, `${size.name}${screen.path().replaceAll('/', '-')}`);
      }
      await page.close();
    });
  }

  it('the menu button opens the folded navigation and a link closes it', async () => {
    const page = await signedInAsDemo(browser, server.baseUrl, 'operator', size);
    expect(await page.isVisible('[data-test="nav-upload"]')).toBe(false);
    await page.click('[data-test="nav-toggle"]');
    await page.click('[data-test="nav-upload"]');
    await page.waitForSelector('[data-test="upload-project"]');
    await page.waitForFunction(() => !document.querySelector('.kf-shell--nav-open'));
    expect(await page.getAttribute('[data-test="nav-toggle"]', 'aria-expanded')).toBe('false');
    await page.close();
  });
});
