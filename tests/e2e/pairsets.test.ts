import { createHash } from 'node:crypto';
import fs from 'node:fs';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Pairset, Project, User } from '../../server/core/models';
import { DEMO_ACCOUNTS } from '../../server/core/people/demo-accounts';
import { getPairsetDetail } from '../../server/core/pairsets/pairsets';
import { launchBrowser, screenshot, signInThroughForm } from '../helpers/browser';
import { addPairsetClip } from '../helpers/pairset-clips';
import { startTestRuntime, type TestRuntime } from '../helpers/pipeline-runtime';
import { startRunningServer, type RunningServer } from '../helpers/running-server';

let server: RunningServer;
let browser: Browser;
let runtime: TestRuntime;
const PROJECT = 'Upper terrace survey';
const CLIPS = 4;
const FRAMES = 24;
const engineer = DEMO_ACCOUNTS.find((account) => account.role === 'engineer')!;

/** Accepted clips made directly (frames, views, motion fields); the build itself runs on the real job runtime. */
beforeAll(async () => {
  server = await startRunningServer();
  browser = await launchBrowser();
  runtime = startTestRuntime(server);
  const admin = (await User.findByEmail('admin@kinefold.test'))!;
  const project = await Project.create({
    name: PROJECT,
    estimator: 'farneback',
    estimatorParams: {},
    sampleFps: 5,
    workingSize: 160,
    deltas: [1, 2],
    flagThresholds: {},
  });
  for (let seed = 0; seed < CLIPS; seed += 1) {
    await addPairsetClip(server, {
      projectId: project.id,
      uploaderId: admin.id,
      frames: FRAMES,
      width: 160,
      height: 120,
      seed,
      site: seed % 2 ? 'Terrace east' : 'Terrace west',
    });
  }
});
afterAll(async () => {
  await runtime?.runtime.stop();
  await runtime?.close();
  await browser?.close();
  await server?.close();
});

async function signedInEngineer(): Promise<Page> {
  const context = await browser.newContext({ viewport: { width: 1440, height: 1100 }, acceptDownloads: true });
  const page = await context.newPage();
  await signInThroughForm(page, server.baseUrl, engineer.email, engineer.password);
  await page.waitForSelector('[data-test="home-engineer"]');
  return page;
}

describe('an engineer and pairsets', () => {
  it('defines a pairset, sees the counts, builds it with a progress bar, reads its report and downloads a shard', async () => {
    const page = await signedInEngineer();
    await page.click('[data-test="nav-pairsets"]');
    await page.waitForSelector('[data-test="pairsets-table"]');
    await page.click('[data-test="pairset-new"]');
    await page.fill('[data-test="pairset-name"]', 'Terrace motion pairs');
    await page.click('[data-test="pairset-projects"]');
    await page.click(`li[role="option"]:has-text("${PROJECT}")`);
    await page.keyboard.press('Escape');
    await page.click('#pairset-view-luma');
    await page.fill('[data-test="pairset-deltas"]', '2');
    await page.fill('#pairset-shard-mb', '0.5');

    // Frame, neighbour+2, luma and motion under the core graph: 3 view pairs a moment. Per clip of 24 frames
    // frame~neighbour+2 has 22 moments, frame~luma 24, frame~motion 23 (the last frame has no field).
    const expected = CLIPS * (22 + 24 + 23);
    await page.waitForFunction(
      (total) =>
        document.querySelector('[data-test="counts-pairs"]')?.textContent?.trim().startsWith(total.toLocaleString()),
      expected,
    );
    const kinds = await page.$$eval('[data-test="kind-counts"] tbody tr', (rows) =>
      rows.map((row) => [...row.querySelectorAll('td')].map((cell) => cell.textContent?.trim())),
    );
    expect(kinds.map((row) => [row[0], row[3]])).toEqual([
      ['frame~neighbour+2', String(CLIPS * 22)],
      ['frame~luma', String(CLIPS * 24)],
      ['frame~motion', String(CLIPS * 23)],
    ]);
    expect((await page.textContent('[data-test="counts-clips"]'))!.trim()).toMatch(new RegExp(`^${CLIPS} `));
    await screenshot(page, 'engineer-pairset-define');

    await page.click('[data-test="pairset-create"]');
    await page.waitForSelector('[data-test="pairset-detail"]');
    expect(await page.textContent('[data-test="pairset-state"]')).toBe('draft');
    await page.click('[data-test="pairset-build"]');
    await page.waitForSelector('[data-test="pairset-progress"] [role="progressbar"]');
    expect(await page.textContent('[data-test="pairset-state"]')).toBe('building');
    const id = Number(new URL(page.url()).pathname.split('/').at(-1));
    void runtime.runtime.run();
    // The page follows the worker's progress while it writes the shards.
    const bar = '[data-test="pairset-progress"] [role="progressbar"]';
    await page.waitForFunction(
      (selector) => Number(document.querySelector(selector)?.getAttribute('aria-valuenow')) > 0,
      bar,
      { timeout: 60_000 },
    );
    await screenshot(page, 'engineer-pairset-building');
    await page.waitForFunction(
      () => document.querySelector('[data-test="pairset-state"]')?.textContent === 'built',
      undefined,
      { timeout: 90_000 },
    );
    expect((await Pairset.findByPk(id))!.state).toBe('built');

    await page.waitForSelector('[data-test="pairset-stats-charts"] canvas');
    const readings = await page.$$eval('[data-test="difficulty-table"] tbody tr', (rows) =>
      rows.map((row) => [...row.querySelectorAll('td')].map((cell) => cell.textContent?.trim())),
    );
    expect(readings.map((row) => [row[0], row[1]])).toEqual([
      ['frame~neighbour+2', '16'],
      ['frame~neighbour+2', '64'],
      ['frame~luma', '16'],
      ['frame~luma', '64'],
      ['frame~motion', '16'],
      ['frame~motion', '64'],
    ]);
    for (const row of readings) expect(row[5]).toMatch(/^(trivial|informative|unrelated)/);
    // The trained critic's report: one panel per view pair, each with its reading and its two charts.
    const critics = await page.$$eval('[data-test="critic-report"] article', (panels) =>
      panels.map((panel) => ({
        kind: panel.querySelector('h3')?.textContent?.trim(),
        message: panel.querySelector('.kf-critic__message')?.textContent ?? '',
        charts: panel.querySelectorAll('canvas').length,
      })),
    );
    expect(critics.map((panel) => panel.kind)).toEqual(['frame~neighbour+2', 'frame~luma', 'frame~motion']);
    for (const panel of critics) {
      expect(panel.message).toMatch(/held-out|val split/);
      expect(panel.charts).toBe(2);
    }
    const detail = await getPairsetDetail(id);
    expect(await page.textContent('[data-test="pairset-curl"]')).toContain(`/api/pairsets/${id}"`);
    await screenshot(page, 'engineer-pairset-built');

    const [download] = await Promise.all([page.waitForEvent('download'), page.click('[data-test="shard-download-0"]')]);
    expect(download.suggestedFilename()).toBe(detail.shards[0]!.file);
    const bytes = fs.readFileSync((await download.path())!);
    expect(bytes.length).toBe(detail.shards[0]!.bytes);
    expect(createHash('sha256').update(bytes).digest('hex')).toBe(detail.shards[0]!.sha256);
    await page.context().close();
  });

  it('creates an API token shown once, lists it by prefix, and revokes it', async () => {
    const page = await signedInEngineer();
    await page.click('[data-test="nav-api-tokens"]');
    await page.fill('[data-test="token-name"]', 'gpu-box-3');
    await page.click('[data-test="token-create"]');
    const token = (await (await page.waitForSelector('[data-test="token-value"]')).textContent())!.trim();
    expect(token).toMatch(/^kft_[0-9a-f]{8}_[A-Za-z0-9_-]{43}$/);
    await screenshot(page, 'engineer-api-token');
    await page.click('[data-test="token-done"]');
    await page.waitForSelector('[data-test="token-value"]', { state: 'detached' });
    const row = await page.textContent('[data-test="tokens-table"] tbody tr');
    expect(row).toContain('gpu-box-3');
    expect(row).toContain(`${token.slice(0, 12)}…`);
    expect(row).not.toContain(token.slice(13));
    const response = await fetch(`${server.baseUrl}/api/pairsets`, { headers: { Authorization: `Bearer ${token}` } });
    expect(response.status).toBe(200);
    await page.click('[data-test^="token-revoke-"]');
    await page.click('.p-confirmdialog-accept-button');
    await page.waitForSelector('[data-test="tokens-table"] tbody tr :text("revoked")');
    const after = await fetch(`${server.baseUrl}/api/pairsets`, { headers: { Authorization: `Bearer ${token}` } });
    expect(after.status).toBe(401);
    await page.context().close();
  });
});
