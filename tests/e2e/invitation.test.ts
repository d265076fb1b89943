import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startMail, type RunningMail } from '../../server/core/mail';
import { MailMessage, User } from '../../server/core/models';
import { DEMO_ACCOUNTS } from '../../server/core/people/demo-accounts';
import { launchBrowser, screenshot, signInThroughForm } from '../helpers/browser';
import { tokenFromLink } from '../helpers/mail';
import { startRunningServer, type RunningServer } from '../helpers/running-server';

let server: RunningServer;
let browser: Browser;
let mail: RunningMail;

beforeAll(async () => {
  server = await startRunningServer();
  mail = await startMail({ ...server.config, smtpUrl: null }, { pollMs: 200 });
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await mail?.stop();
  await server?.close();
});

const INVITEE = 'marit.solberg@kinefold.test';

describe('inviting a person', () => {
  it('the admin invites someone who opens the link from the mail log, sets a password and lands on their home', async () => {
    const adminContext = await browser.newContext({ viewport: { width: 1440, height: 900 } });
    const page = await adminContext.newPage();
    const admin = DEMO_ACCOUNTS.find((account) => account.role === 'admin')!;
    await signInThroughForm(page, server.baseUrl, admin.email, admin.password);
    await page.waitForSelector('[data-test="home-admin"]');

    await page.click('[data-test="nav-people"]');
    await page.click('[data-test="invite-open"]');
    await page.fill('#invite-email', INVITEE);
    await page.click('[data-test="invite-dialog"] .p-select');
    await page.getByRole('option', { name: 'curator', exact: true }).click();
    await page.click('[data-test="invite-dialog"] button[type="submit"]');
    await page.waitForSelector(`[data-test="invitations-table"] tr:has-text("${INVITEE}")`);
    expect(await page.textContent(`[data-test="invitations-table"] tr:has-text("${INVITEE}")`)).toMatch(/pending/);
    await screenshot(page, 'people-invitations');

    // The server's sender delivers the outbox to the fake SMTP server in the background.
    await expect.poll(() => MailMessage.count({ where: { to: INVITEE } }), { timeout: 15_000 }).toBe(1);
    await page.click('[data-test="nav-mail-log"]');
    await page.click(`[data-test="mail-table"] tr:has-text("${INVITEE}")`);
    const text = (await page.textContent('[data-test="mail-text"]')) ?? '';
    expect(text).toContain(`${admin.name} invited you to Kinefold as a curator`);
    const link = text.match(/\S+\/invite\/[A-Za-z0-9_-]{43}/)?.[0] ?? '';
    // No KINEFOLD_PUBLIC_URL is set: links are derived from the port this server listens on (PORT), so they reach it.
    expect(server.config.publicUrlSource).toBe('derived');
    expect(link.startsWith(`http://localhost:${new URL(server.baseUrl).port}/invite/`)).toBe(true);
    await screenshot(page, 'mail-log');
    await page.getByRole('tab', { name: 'As formatted' }).click();
    const formatted = page.frameLocator('iframe[title="Formatted message"]');
    expect(await formatted.locator('a').first().getAttribute('href')).toBe(link);
    await screenshot(page, 'mail-log-formatted');
    // The admin works at 127.0.0.1 while links say localhost: Settings shows the public URL and says so.
    await page.click('[data-test="nav-admin-settings"]');
    const notice = await page.waitForSelector('[data-test="settings-public-url"]');
    expect(await notice.textContent()).toContain(server.config.publicUrl);
    expect(await page.textContent('[data-test="settings-public-url-warning"]')).toContain(
      `You are using ${server.baseUrl}`,
    );
    await screenshot(page, 'settings-public-url');
    await adminContext.close();

    // A fresh context shares nothing with the admin's; it opens the mailed link itself.
    const inviteeContext = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    const invitee = await inviteeContext.newPage();
    await invitee.goto(link);
    await invitee.waitForSelector('[data-test="invitation-form"]');
    expect(await invitee.textContent('[data-test="invitation-form"]')).toContain(INVITEE);
    await invitee.fill('#invitation-name', 'Marit Solberg');
    await invitee.fill('#invitation-password', 'ridge');
    expect(await invitee.textContent('[data-test="password-problem"]')).toMatch(/at least 12 characters/);
    await invitee.fill('#invitation-password', 'frames-from-the-ridge-09');
    await screenshot(invitee, 'invitation-form');
    await invitee.click('[data-test="invitation-form"] button[type="submit"]');
    await invitee.waitForSelector('[data-test="home-curator"]');
    expect(new URL(invitee.url()).pathname).toBe('/');
    expect(await invitee.textContent('[data-test="signed-in-user"]')).toContain('Marit Solberg');
    await screenshot(invitee, 'invitation-home');
    await inviteeContext.close();

    const laterContext = await browser.newContext();
    const later = await laterContext.newPage();
    await later.goto(link);
    await later.waitForSelector('[data-test="invitation-unusable"]');
    expect(await later.textContent('[data-test="invitation-unusable"]')).toMatch(/already been used/);
    await laterContext.close();
  });

  it('a person who forgot their password gets a link, chooses a new one and then renames themselves', async () => {
    const operator = DEMO_ACCOUNTS.find((account) => account.role === 'operator')!;
    const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    const page = await context.newPage();
    await page.goto(`${server.baseUrl}/sign-in`);
    await page.click('text=Forgot password?');
    await page.fill('#forgot-email', operator.email);
    await page.click('button[type="submit"]');
    expect(await page.textContent('[data-test="reset-requested"]')).toMatch(/If that address belongs/);

    await expect.poll(() => MailMessage.count({ where: { to: operator.email } }), { timeout: 15_000 }).toBe(1);
    const [message] = await MailMessage.findAll({ where: { to: operator.email } });
    const token = tokenFromLink(message!, server.config.publicUrl, '/reset-password/');
    await page.goto(`${server.baseUrl}/reset-password/${token}`);
    await page.fill('#reset-password', 'kinefold1234');
    expect(await page.textContent('[data-test="password-problem"]')).toMatch(/too common/);
    await page.fill('#reset-password', 'furrows-after-the-rain-11');
    await page.click('button[type="submit"]');
    await page.waitForSelector('[data-test="password-reset-done"]');
    await screenshot(page, 'password-reset-done');

    await signInThroughForm(page, server.baseUrl, operator.email, 'furrows-after-the-rain-11');
    await page.waitForSelector('[data-test="home-operator"]');
    await page.click('[data-test="nav-profile"]');
    await page.waitForSelector('[data-test="profile"]');
    expect(await page.textContent('[data-test="profile-role"]')).toBe('operator');
    await page.fill('#profile-name', 'Tove Marrick-Lund');
    await page.click('text=Save name');
    await page.waitForSelector('[data-test="signed-in-user"]:has-text("Tove Marrick-Lund")');
    expect((await User.findByEmail(operator.email))!.name).toBe('Tove Marrick-Lund');
    await screenshot(page, 'profile');
    await context.close();
  });
});
