import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Project } from '../../server/core/models';
import { DEMO_ACCOUNTS } from '../../server/core/people/demo-accounts';
import { launchBrowser, screenshot, signInThroughForm } from '../helpers/browser';
import { makeTestClip } from '../helpers/media-fixtures';
import { startRunningServer, type RunningServer } from '../helpers/running-server';

let server: RunningServer;
let browser: Browser;
const media = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-e2e-quota-'));
let clip: string;

beforeAll(async () => {
  server = await startRunningServer();
  browser = await launchBrowser();
  await Project.create({
    name: 'Terrace quota trial',
    estimator: 'farneback',
    estimatorParams: {},
    sampleFps: 5,
    workingSize: 320,
    deltas: [1],
    flagThresholds: {},
    quotaBytes: 1024 ** 3,
  });
  clip = await makeTestClip(media, 'terrace-late.mp4', { seed: 9 });
});
afterAll(async () => {
  await browser?.close();
  await server?.close();
  fs.rmSync(media, { recursive: true, force: true });
});

const account = (role: string) => DEMO_ACCOUNTS.find((entry) => entry.role === role)!;

describe('an admin lowering a project quota', () => {
  it("makes the operator's next upload refused with a message naming the quota", async () => {
    const adminPage = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
    await signInThroughForm(adminPage, server.baseUrl, account('admin').email, account('admin').password);
    await adminPage.click('[data-test="nav-projects"]');
    await adminPage.click('button[aria-label="Edit Terrace quota trial"]');
    await adminPage.waitForSelector('[data-test="project-dialog"]');
    await adminPage.fill('#project-quota', '0.01');
    await adminPage.click('[data-test="project-dialog"] [aria-label="Quota unit"]');
    await adminPage.click('li[role="option"]:has-text("MiB")');
    await adminPage.click('[data-test="project-dialog"] button[type="submit"]');
    await adminPage.waitForSelector('[data-test="project-dialog"]', { state: 'detached' });
    expect(Number((await Project.findOne({ where: { name: 'Terrace quota trial' } }))!.quotaBytes)).toBe(10486);
    await screenshot(adminPage, 'admin-projects');
    await adminPage.close();

    const page = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
    await signInThroughForm(page, server.baseUrl, account('operator').email, account('operator').password);
    await page.click('[data-test="nav-upload"]');
    await page.click('[data-test="upload-project"]');
    await page.click('li[role="option"]:has-text("Terrace quota trial")');
    expect(await page.textContent('[data-test="upload-quota"]')).toMatch(/of the project's 10\.2 KiB quota used/);
    await page.setInputFiles('input[type="file"]', [clip]);
    await page.click('[data-test="upload-start"]');
    // No capture time: the batch asks once before it goes.
    await page.click('.p-confirmdialog-accept-button');
    await page.waitForSelector('[data-test="upload-state-terrace-late.mp4"]:has-text("refused")');
    expect(await page.textContent('[data-test="upload-message-terrace-late.mp4"]')).toMatch(
      /Project "Terrace quota trial"'s quota of 10\.2 KiB has 10\.2 KiB left; this upload needs/,
    );
    await page.close();
  });
});
