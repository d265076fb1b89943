import fs from 'node:fs';
import path from 'node:path';
import { chromium, type Browser, type Page } from 'playwright-core';
import { DEMO_ACCOUNTS } from '../../server/core/people/demo-accounts';
import type { Role } from '../../shared/roles';

/** Where screenshots go: the test artifacts, or the README's folder when `npm run docs:screenshots` sets it. */
export const ARTIFACTS_DIR = path.resolve(process.env.KINEFOLD_SCREENSHOTS_DIR ?? 'tests/e2e/artifacts');

/** Debian's Chromium, headless, with the flags that keep it off the (closed) network. */
export function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: '/usr/bin/chromium',
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--no-first-run',
      '--disable-quic',
    ],
  });
}

export async function screenshot(page: Page, name: string): Promise<void> {
  fs.mkdirSync(ARTIFACTS_DIR, { recursive: true });
  await page.screenshot({ path: path.join(ARTIFACTS_DIR, `${name}.png`), fullPage: true });
}

export async function signInThroughForm(page: Page, baseUrl: string, email: string, password: string): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  await page.fill('#sign-in-email', email);
  await page.fill('#sign-in-password', password);
  await page.click('button[type="submit"]');
}

/** A new browser context signed in as the demo account of `role`, on its home page. */
export async function signedInAsDemo(
  browser: Browser,
  baseUrl: string,
  role: Role,
  viewport = { width: 1440, height: 1000 },
): Promise<Page> {
  const account = DEMO_ACCOUNTS.find((candidate) => candidate.role === role)!;
  const page = await (await browser.newContext({ viewport })).newPage();
  await signInThroughForm(page, baseUrl, account.email, account.password);
  await page.waitForSelector(`[data-test="home-${role}"]`);
  return page;
}
