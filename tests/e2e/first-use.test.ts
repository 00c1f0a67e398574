// Browser flow: what a new user meets first. The sign-in page of a fresh browser, the request
// log's names, the charts, the liquor library, billing, the outbox, and the way back from the API
// reference; then every main view at a desktop and a phone size, saved as screenshots.
import { describe, expect, it } from 'vitest';
import { ADMIN_EMAIL, ADMIN_PASSWORD, openFromDrawer, setUpConsoleFlow, signIn } from './harness.js';

const flow = setUpConsoleFlow();

/** server/seed/demo.ts: the demo account and its key, on which the demo usage is metered. */
const DEMO_ACCOUNT = 'Saltmarsh Chlor-Alkali Works';
const DEMO_KEY = 'Caustic evaporator studies';

describe('first use of the console', () => {
  it('does not tell a first visitor that their session ended, and keeps what they type', async () => {
    const { page } = flow.browser;
    await page.goto(`${flow.server.origin}/console/sign-in`);
    const email = page.getByLabel('E-mail');
    await email.waitFor();
    await email.fill(ADMIN_EMAIL);
    // The console's own look-ups (who is signed in, a refresh) finish after the form appears.
    await flow.browser.settle(500, 5000);
    expect(page.url()).not.toContain('expired=1');
    expect(await page.getByText('Your session ended').count()).toBe(0);
    expect(await email.inputValue()).toBe(ADMIN_EMAIL);
  }, 60_000);

  it('tells a user who was signed in that the session ended once its cookies are gone', async () => {
    const { page, context } = flow.browser;
    await signIn(page, flow.server.origin, ADMIN_EMAIL, ADMIN_PASSWORD);
    await context.clearCookies();
    await page.goto(`${flow.server.origin}/console/keys`);
    await page.waitForURL(/\/console\/sign-in/);
    await page.getByText('Your session ended').waitFor();
    await signIn(page, flow.server.origin, ADMIN_EMAIL, ADMIN_PASSWORD);
  }, 60_000);

  it('names the key and the account of a logged request instead of their numbers', async () => {
    const { page } = flow.browser;
    await openFromDrawer(page, 'Request log');
    const row = page.locator('.v-data-table tbody tr', { hasText: DEMO_ACCOUNT }).first();
    await row.waitFor();
    await row.click();
    const drawer = page.locator('.v-navigation-drawer--active', { hasText: 'Engine' });
    await drawer.waitFor();
    const text = await drawer.innerText();
    expect(text).toContain(DEMO_KEY);
    expect(text).toContain(DEMO_ACCOUNT);
    expect(text).not.toMatch(/\bKey \d+\b/);
    expect(text).not.toMatch(/\bAccount \d+\b/);
    await page.keyboard.press('Escape');
  }, 60_000);
});
