import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  DEMO_BALANCE,
  DEMO_CLIPS,
  DEMO_INVITATION,
  DEMO_PAIRSET,
  DEMO_PROJECTS,
  DEMO_TOKEN_NAME,
  DEMO_VERDICTS,
} from '../../server/demo/scenario';
import { DEMO_ACCOUNTS } from '../../server/core/people/demo-accounts';
import type { ListPage } from '../../shared/api-types';
import type { PairsetDetail, PairsetSummary } from '../../shared/types/pairsets';
import type { UsageReport } from '../../shared/types/admin';
import type { ClipSummary } from '../../shared/types/clips';
import { startRunningApp, type RunningApp, type Session } from '../helpers/app-processes';
import { launchBrowser, screenshot, signedInAsDemo } from '../helpers/browser';

/**
 * The first start a new user gets from `npm start`: a server and a worker process on a new storage folder with
 * KINEFOLD_DEMO=full. The test waits for the whole campaign (footage rendered and ingested, every clip processed,
 * the curator's verdicts, the engineer's pairset built), then walks each role's main screens and checks that each
 * shows demo content. With KINEFOLD_SCREENSHOTS_DIR=docs/screenshots (`npm run docs:screenshots`) its screenshots
 * are the README's.
 */
let app: RunningApp;
let browser: Browser;
const storage = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-e2e-demo-'));
const CAMPAIGN_TIMEOUT_MS = 25 * 60_000;
const POLL_MS = 3000;
const DEMO_FILE_COUNT = DEMO_CLIPS.length + 1;

async function getJson<T>(session: Session, url: string): Promise<T> {
  const response = await app.api(session, 'GET', url);
  expect(response.status, url).toBe(200);
  return (await response.json()) as T;
}

async function until<T>(what: string, read: () => Promise<T | null>): Promise<T> {
  const deadline = Date.now() + CAMPAIGN_TIMEOUT_MS;
  for (;;) {
    const value = await read();
    if (value !== null) return value;
    if (Date.now() > deadline) throw new Error(`the demo campaign did not reach "${what}" in time`);
    await new Promise((done) => setTimeout(done, POLL_MS));
  }
}

/** The rows of a table once at least `atLeast` have rendered (lazy tables fill in after their request returns). */
async function rows(page: Page, table: string, atLeast = 1): Promise<number> {
  const selector = `[data-test="${table}"] tbody tr:not(.p-datatable-empty-message, .kf-qtable__empty)`;
  await page.waitForFunction(
    ([rowSelector, least]) => document.querySelectorAll(rowSelector as string).length >= (least as number),
    [selector, atLeast] as const,
  );
  return page.locator(selector).count();
}

/**
 * A screenshot once the page's pictures have arrived: every thumbnail, and the lazily loaded frames and motion
 * pictures that are inside the window.
 */
async function shot(page: Page, name: string): Promise<void> {
  await page.waitForFunction(() =>
    [...document.querySelectorAll('img')]
      .filter((image) => {
        const box = image.getBoundingClientRect();
        const inWindow = box.bottom > 0 && box.top < window.innerHeight && box.left < window.innerWidth;
        return box.width > 0 && (image.loading !== 'lazy' || inWindow);
      })
      .every((image) => image.complete && image.naturalWidth > 0),
  );
  await screenshot(page, name);
}

beforeAll(async () => {
  const started = Date.now();
  app = await startRunningApp(storage, { worker: true, demo: 'full' });
  browser = await launchBrowser();
  const admin = await app.signIn('admin');
  const engineer = await app.signIn('engineer');
  const firstProcessed = await until('a first clip processed', async () => {
    const page = await getJson<ListPage<ClipSummary>>(admin, '/api/clips?state=awaiting_review&pageSize=1');
    return page.total > 0 ? Date.now() : null;
  });
  console.log(`demo: first clip processed ${((firstProcessed - started) / 1000).toFixed(0)} s after the start`);
  await until('every clip processed', async () => {
    const all = await getJson<ListPage<ClipSummary>>(admin, '/api/clips?pageSize=200');
    const waiting = all.items.filter((clip) => clip.state === 'queued' || clip.state === 'processing');
    return all.total === DEMO_FILE_COUNT && waiting.length === 0 ? true : null;
  });
  const pairset = await until('the demo pairset built', async () => {
    const list = await getJson<ListPage<PairsetSummary>>(engineer, '/api/pairsets');
    const found = list.items.find((item) => item.name === DEMO_PAIRSET.name);
    if (found?.state === 'failed') throw new Error(`the demo pairset failed to build: ${found.error}`);
    return found?.state === 'built' ? found : null;
  });
  // The balanced demo pairset: no one cluster of the orchard's moments gives more than the cap's share.
  const detail = await getJson<PairsetDetail>(engineer, `/api/pairsets/${pairset.id}`);
  const clusters = detail.stats!.clusters!;
  console.log(
    `demo: ${clusters.clusters.length} clusters; largest share ${clusters.largestShareBefore.toFixed(2)} before ` +
      `balancing, ${clusters.largestShareAfter.toFixed(2)} after (cap ${DEMO_BALANCE.capShare})`,
  );
  expect(clusters.largestShareAfter).toBeLessThanOrEqual(DEMO_BALANCE.capShare);
  await until('storage measured by kind', async () => {
    const usage = await getJson<UsageReport>(admin, '/api/admin/usage');
    return usage.byKind && usage.byKind.pairsets > 0 ? usage : null;
  });
  console.log(`demo: campaign complete ${((Date.now() - started) / 1000).toFixed(0)} s after the start`);
}, CAMPAIGN_TIMEOUT_MS + 60_000);
afterAll(async () => {
  await browser?.close();
  await app?.stop();
  fs.rmSync(storage, { recursive: true, force: true });
});

describe('the demo campaign on first start', () => {
  it('gives the operator their clips, with every demo file in and the refused one out', async () => {
    const page = await signedInAsDemo(browser, app.baseUrl, 'operator');
    await shot(page, 'operator-home');
    await page.click('[data-test="nav-clips"]');
    expect(await rows(page, 'clips-table', DEMO_FILE_COUNT)).toBe(DEMO_FILE_COUNT);
    const table = await page.textContent('[data-test="clips-table"]');
    for (const state of ['awaiting review', 'accepted', 'rejected']) expect(table).toContain(state);
    expect(table).not.toContain('creek-field-notes.txt');
    await shot(page, 'operator-clips');
    await page.click('[data-test="nav-upload"]');
    await page.waitForSelector('[data-test="privacy-notice"]');
    await page.click('[data-test="upload-project"]');
    await page.click(`li[role="option"]:has-text("${DEMO_PROJECTS[0].name}")`);
    await page.waitForSelector('[data-test="upload-quota"] [role="progressbar"]');
    await page.waitForSelector('.p-select-overlay', { state: 'hidden' });
    await shot(page, 'operator-upload');
    await page.context().close();
  });

  it('leaves the curator a queue with the flagged clips and the evidence for each', async () => {
    const page = await signedInAsDemo(browser, app.baseUrl, 'curator');
    await page.click('[data-test="nav-review-queue"]');
    const waiting = DEMO_FILE_COUNT - DEMO_VERDICTS.length;
    expect(await rows(page, 'queue-table', waiting)).toBe(waiting);
    const queue = await page.textContent('[data-test="queue-table"]');
    // cut-heavy: the door clip's one cut (recording paused and resumed in the same rows) in 8 s is 7.5 a minute.
    for (const flag of ['static', 'shaky', 'overexposed', 'short', 'cut-heavy']) expect(queue).toContain(flag);
    await shot(page, 'curator-queue');
    await page.click('[data-test="queue-table"] tbody tr:has-text("creek-bank-02.mp4") [data-test^="queue-open-"]');
    await page.waitForSelector('[data-test="frame-strip"] img');
    await page.waitForSelector('[data-test="claim-mine"]');
    await shot(page, 'curator-review');
    await page.context().close();
  });

  it('shows the engineer the built demo pairset with its report', async () => {
    const page = await signedInAsDemo(browser, app.baseUrl, 'engineer');
    await page.click('[data-test="nav-pairsets"]');
    expect(await rows(page, 'pairsets-table')).toBe(1);
    await shot(page, 'engineer-pairsets');
    await page.click(`[data-test="pairsets-table"] tbody tr :text("${DEMO_PAIRSET.name}")`);
    await page.waitForSelector('[data-test="pairset-stats-charts"] canvas');
    expect(await rows(page, 'difficulty-table')).toBeGreaterThan(0);
    await shot(page, 'engineer-pairset');
    await page.click('[data-test="nav-api-tokens"]');
    expect(await rows(page, 'tokens-table')).toBe(1);
    expect(await page.textContent('[data-test="tokens-table"]')).toContain(DEMO_TOKEN_NAME);
    await page.context().close();
  });

  it('shows the admin where the bytes are, what the worker did and who did what', async () => {
    const page = await signedInAsDemo(browser, app.baseUrl, 'admin');
    await page.click('[data-test="nav-admin-usage"]');
    await page.waitForSelector('[data-test="usage-by-kind"] canvas');
    const usage = await page.textContent('[data-test="usage"]');
    for (const project of DEMO_PROJECTS) expect(usage).toContain(project.name);
    await shot(page, 'admin-usage');
    await page.click('[data-test="nav-admin-jobs"]');
    expect(await rows(page, 'jobs-table')).toBeGreaterThan(0);
    await shot(page, 'admin-jobs');
    await page.click('[data-test="nav-admin-audit"]');
    expect(await rows(page, 'audit-table', DEMO_VERDICTS.length + 1)).toBeGreaterThan(DEMO_VERDICTS.length);
    await shot(page, 'admin-audit');
    await page.click('[data-test="nav-people"]');
    expect(await rows(page, 'people-table', DEMO_ACCOUNTS.length)).toBe(DEMO_ACCOUNTS.length);
    expect(await rows(page, 'invitations-table')).toBe(1);
    expect(await page.textContent('[data-test="invitations-table"]')).toContain(DEMO_INVITATION.email);
    await page.click('[data-test="nav-mail-log"]');
    expect(await rows(page, 'mail-table')).toBeGreaterThan(0);
    expect(await page.textContent('[data-test="mail-table"]')).toContain(DEMO_INVITATION.email);
    await page.click('[data-test="nav-projects"]');
    expect(await rows(page, 'projects-table', DEMO_PROJECTS.length)).toBe(DEMO_PROJECTS.length);
    await shot(page, 'admin-projects');
    await page.context().close();
  });
});
