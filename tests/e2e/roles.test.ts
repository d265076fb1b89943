import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_ACCOUNTS } from '../../server/core/people/demo-accounts';
import { launchBrowser, screenshot, signInThroughForm } from '../helpers/browser';
import { startRunningServer, type RunningServer } from '../helpers/running-server';

let server: RunningServer;
let browser: Browser;

beforeAll(async () => {
  server = await startRunningServer();
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.close();
});

/** What each role's side navigation offers (admin sees everything). */
const EXPECTED_NAV: Record<string, string[]> = {
  operator: ['nav-home', 'nav-upload', 'nav-clips', 'nav-projects', 'nav-profile'],
  curator: ['nav-home', 'nav-clips', 'nav-review-queue', 'nav-projects', 'nav-profile'],
  engineer: ['nav-home', 'nav-clips', 'nav-projects', 'nav-pairsets', 'nav-api-tokens', 'nav-profile'],
  admin: [
    'nav-home',
    'nav-upload',
    'nav-clips',
    'nav-review-queue',
    'nav-projects',
    'nav-pairsets',
    'nav-api-tokens',
    'nav-people',
    'nav-admin-usage',
    'nav-admin-jobs',
    'nav-admin-audit',
    'nav-admin-settings',
    'nav-mail-log',
    'nav-profile',
  ],
};

describe('signing in as each demo account', () => {
  it('shows the sign-in page with the product name and purpose', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 800 } });
    await page.goto(`${server.baseUrl}/`);
    await page.waitForURL(/\/sign-in/);
    expect(await page.textContent('h1')).toBe('Kinefold');
    expect(await page.textContent('.kf-sign-in__purpose')).toMatch(/paired views/);
    await screenshot(page, 'sign-in');
    await page.close();
  });

  for (const account of DEMO_ACCOUNTS) {
    it(`${account.role} sees their own navigation and home`, async () => {
      const context = await browser.newContext({ viewport: { width: 1920, height: 1080 } });
      const page = await context.newPage();
      await signInThroughForm(page, server.baseUrl, account.email, account.password);
      await page.waitForSelector(`[data-test="home-${account.role}"]`);
      expect(await page.textContent('[data-test="signed-in-user"]')).toContain(account.name);
      const navTests = await page.$$eval('nav [data-test^="nav-"]', (links) =>
        links.map((l) => l.getAttribute('data-test')),
      );
      expect(navTests).toEqual(EXPECTED_NAV[account.role]);
      await screenshot(page, `home-${account.role}`);
      await context.close();
    });
  }

  it('lands a curator who types an admin address on the not-allowed page', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    const page = await context.newPage();
    const curator = DEMO_ACCOUNTS.find((account) => account.role === 'curator')!;
    await signInThroughForm(page, server.baseUrl, curator.email, curator.password);
    await page.waitForSelector('[data-test="home-curator"]');
    await page.goto(`${server.baseUrl}/people`);
    await page.waitForSelector('[data-test="not-allowed"]');
    expect(await page.textContent('[data-test="not-allowed"]')).toMatch(/not open to the curator role/);
    await screenshot(page, 'curator-not-allowed');
    await context.close();
  });

  it("shows a wrong password as the server's message", async () => {
    const page = await browser.newPage();
    await signInThroughForm(page, server.baseUrl, 'admin@kinefold.test', 'not-the-right-one');
    await page.waitForSelector('[data-test="sign-in-error"]');
    expect(await page.textContent('[data-test="sign-in-error"]')).toContain('E-mail address or password is wrong.');
    await page.close();
  });

  it('lets the admin page through the people table', async () => {
    const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    const page = await context.newPage();
    const admin = DEMO_ACCOUNTS.find((account) => account.role === 'admin')!;
    await signInThroughForm(page, server.baseUrl, admin.email, admin.password);
    await page.click('[data-test="nav-people"]');
    await page.waitForSelector('[data-test="people-table"] tbody tr:nth-child(4)');
    expect(await page.textContent('[data-test="people-table"]')).toContain('curator@kinefold.test');
    await screenshot(page, 'admin-people');
    await context.close();
  });
});
