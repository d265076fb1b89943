import fs from 'node:fs';
import path from 'node:path';
import { chromium, type Browser, type Page } from 'playwright-core';

export const ARTIFACTS_DIR = path.resolve('tests/e2e/artifacts');

/** Debian's Chromium, headless, with the flags that keep it off the (closed) network. */
export function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: '/usr/bin/chromium',
    headless: true,
    args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update',
      '--disable-sync', '--no-first-run', '--disable-quic'],
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
