import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Clip, Project } from '../../server/core/models';
import { DEMO_ACCOUNTS } from '../../server/core/people/demo-accounts';
import { launchBrowser, screenshot, signInThroughForm } from '../helpers/browser';
import { makeTestClip } from '../helpers/media-fixtures';
import { startRunningServer, type RunningServer } from '../helpers/running-server';

let server: RunningServer;
let browser: Browser;
const media = fs.mkdtempSync(path.join(os.tmpdir(), 'kinefold-e2e-upload-'));
const files: string[] = [];

beforeAll(async () => {
  server = await startRunningServer();
  browser = await launchBrowser();
  await Project.create({
    name: 'Glasshouse bench trials',
    estimator: 'farneback',
    estimatorParams: {},
    sampleFps: 5,
    workingSize: 320,
    deltas: [1, 2],
    flagThresholds: {},
  });
  files.push(await makeTestClip(media, 'bench-row-a.mp4', { seed: 4, seconds: 3 }));
  files.push(await makeTestClip(media, 'bench-row-b.mp4', { seed: 5, seconds: 3 }));
  const notes = path.join(media, 'field-notes.txt');
  fs.writeFileSync(notes, 'Irrigation check at bench 4.\n');
  files.push(notes);
});
afterAll(async () => {
  await browser?.close();
  await server?.close();
  fs.rmSync(media, { recursive: true, force: true });
});

describe('an operator uploading a batch', () => {
  it('uploads two clips with metadata, sees progress and results, and finds both queued', async () => {
    const operator = DEMO_ACCOUNTS.find((account) => account.role === 'operator')!;
    const page = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
    await signInThroughForm(page, server.baseUrl, operator.email, operator.password);
    await page.click('[data-test="nav-upload"]');
    await page.waitForSelector('[data-test="privacy-notice"]');
    await page.click('[data-test="upload-project"]');
    await page.click('li[role="option"]:has-text("Glasshouse bench trials")');
    await page.fill('#capture-site', 'Glasshouse, bench 4');
    await page.fill('#capture-rig', 'handheld');
    await page.fill('#capture-tags', 'benches');
    await page.keyboard.press('Enter');
    await page.setInputFiles('input[type="file"]', files);

    // Capture time: what cannot be read stays in the field with the reason, and holds the batch back.
    await page.fill('#capture-at', '07/04/2026 09:15');
    await page.press('#capture-at', 'Tab');
    expect(await page.inputValue('#capture-at')).toBe('07/04/2026 09:15');
    expect(await page.textContent('[data-test="capture-time-reading"]')).toMatch(/day-first or month-first/);
    expect(await page.isDisabled('[data-test="upload-start"]')).toBe(true);
    // A date alone is kept as midnight; the picker's own format is kept as typed, in the chosen zone.
    await page.fill('#capture-at', '2026-04-07');
    await page.press('#capture-at', 'Tab');
    expect(await page.inputValue('#capture-at')).toBe('2026-04-07 00:00');
    expect(await page.textContent('[data-test="capture-time-reading"]')).toMatch(/taken as 00:00/);
    await page.click('[data-test="capture-time-zone"]');
    await page.fill('.p-select-filter', 'Berlin');
    await page.click('li[role="option"]:has-text("Europe/Berlin")');
    await page.fill('#capture-at', '2026-04-07 09:15');
    await page.press('#capture-at', 'Tab');
    expect(await page.inputValue('#capture-at')).toBe('2026-04-07 09:15');
    // Berlin is on summer time (UTC+2) from the last Sunday of March (EU Directive 2000/84/EC).
    expect(await page.textContent('[data-test="capture-time-reading"]')).toContain('2026-04-07T09:15:00+02:00');
    await page.click('[data-test="upload-start"]');
    await page.waitForSelector('[data-test="upload-overall"]');
    for (const name of ['bench-row-a.mp4', 'bench-row-b.mp4']) {
      await page.waitForSelector(`[data-test="upload-state-${name}"]:has-text("created")`);
    }
    await page.waitForSelector('[data-test="upload-state-field-notes.txt"]:has-text("refused")');
    expect(await page.textContent('[data-test="upload-message-field-notes.txt"]')).toMatch(/is not a video file/);
    await screenshot(page, 'upload-batch-result');

    await page.click('[data-test="nav-clips"]');
    await page.waitForSelector('[data-test="clips-table"] tbody tr:nth-child(2)');
    const table = await page.textContent('[data-test="clips-table"]');
    expect(table).toContain('bench-row-a.mp4');
    expect(table).toContain('bench-row-b.mp4');
    expect(table?.match(/queued/g)?.length).toBe(2);
    expect(table).toContain('Glasshouse, bench 4');
    const stored = await Clip.findOne({ where: { originalName: 'bench-row-a.mp4' } });
    expect(stored!.capturedAt!.toISOString()).toBe('2026-04-07T07:15:00.000Z');
    await screenshot(page, 'upload-clips-queued');
    await page.close();
  });
});
