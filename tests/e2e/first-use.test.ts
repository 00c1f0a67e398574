// Browser flow: what a new user meets first. The sign-in page of a fresh browser, the request
// log's names, the charts, the liquor library, billing, the outbox, and the way back from the API
// reference; then every main view at a desktop and a phone size, saved as screenshots.
import { describe, expect, it } from 'vitest';
import {
  ADMIN_EMAIL,
  ADMIN_PASSWORD,
  DEMO_CONSOLE_PASSWORD,
  DEMO_DEVELOPER_EMAIL,
  openFromDrawer,
  screenshot,
  setUpConsoleFlow,
  signIn,
} from './harness.js';

const flow = setUpConsoleFlow();

/** server/seed/demo.ts: the demo account and its key, on which the demo usage is metered. */
const DEMO_ACCOUNT = 'Saltmarsh Chlor-Alkali Works';
const DEMO_KEY = 'Caustic evaporator studies';

/** The previous calendar month in UTC, "YYYY-MM". */
function previousUtcMonth(now = new Date()): string {
  const d = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth() - 1, 1));
  return `${d.getUTCFullYear()}-${String(d.getUTCMonth() + 1).padStart(2, '0')}`;
}

/** The main views: [path under /console/, heading]. */
const MAIN_VIEWS = [
  ['', 'Overview'],
  ['accounts', 'Accounts'],
  ['keys', 'API keys'],
  ['request-log', 'Request log'],
  ['usage', 'Usage'],
  ['billing', 'Billing'],
  ['liquors', 'Liquor library'],
  ['users', 'People'],
  ['audit', 'Audit trail'],
  ['outbox', 'Outbox'],
] as const;

/** Dates written as the console's one style allows: 2026-12-03, 2026-12 (never 12/3/2026 or 3.12.2026). */
const FOREIGN_DATE = /\b\d{1,2}[/.]\d{1,2}[/.]\d{2,4}\b/;

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
    const inspector = page.locator('[data-test="request-inspector"]', { hasText: 'Engine' });
    await inspector.waitFor();
    const text = await inspector.innerText();
    expect(text).toContain(DEMO_KEY);
    expect(text).toContain(DEMO_ACCOUNT);
    expect(text).not.toMatch(/\bKey \d+\b/);
    expect(text).not.toMatch(/\bAccount \d+\b/);
    await page.keyboard.press('Escape');
  }, 60_000);

  it('shows the busiest operations with requests and units side by side, sorted by requests', async () => {
    const { page } = flow.browser;
    await openFromDrawer(page, 'Overview');
    const table = page.locator('[data-test="top-operations"]');
    await table.waitFor();
    const head = (await table.locator('thead th').allInnerTexts()).map((t) => t.trim());
    expect(head).toEqual(['Operation', 'Requests', 'Failed', 'Units']);
    const requests = (await table.locator('tbody tr td:nth-child(2)').allInnerTexts()).map((t) =>
      Number(t.replace(/\D/g, '')),
    );
    expect(requests.length).toBeGreaterThan(1);
    expect([...requests].sort((a, b) => b - a)).toEqual(requests);
    expect(await page.locator('main').innerText()).not.toMatch(FOREIGN_DATE);
  }, 60_000);

  it('writes the usage days and the billing month in the console’s one date style', async () => {
    const { page } = flow.browser;
    await openFromDrawer(page, 'Usage');
    for (const label of ['First day', 'Last day'])
      expect(await page.getByLabel(label).inputValue()).toMatch(/^\d{4}-\d{2}-\d{2}$/);
    expect(await page.locator('main').innerText()).not.toMatch(FOREIGN_DATE);
    await openFromDrawer(page, 'Billing');
    expect(await page.getByLabel('Month (UTC)').inputValue()).toMatch(/^\d{4}-\d{2}$/);
  }, 60_000);

  it('lists liquor cautions compactly and lets long names wrap instead of cutting them', async () => {
    const { page } = flow.browser;
    await openFromDrawer(page, 'Liquor library');
    const item = page.locator('.liquor-list .v-list-item', { hasText: /black liquor/i }).first();
    await item.click();
    const cautions = page.locator('[data-test="cautions"]');
    await cautions.waitFor();
    expect(await cautions.locator('[data-test="caution"]').count()).toBeGreaterThan(0);
    // No full-width solid banner above the model any more.
    expect(await page.locator('main .v-alert--variant-flat').count()).toBe(0);
    const cut = await page
      .locator('.liquor-list .v-list-item-title')
      .evaluateAll((els) =>
        els
          .filter((e) => e.scrollWidth > e.clientWidth + 1 || getComputedStyle(e).textOverflow === 'ellipsis')
          .map((e) => e.textContent),
      );
    expect(cut).toEqual([]);
    // The CSV help text breaks only between column names.
    const header = page.locator('.csv-header');
    expect(await header.evaluate((e) => getComputedStyle(e).wordBreak)).toBe('keep-all');
    expect(await page.getByText('Heat capacity').first().isVisible()).toBe(true);
    expect(await page.locator('main').innerText()).not.toMatch(/\(optional\)\s*$/m);
    await screenshot(page, 'first-use-liquor-library');
  }, 60_000);

  it('closes the statement dialog with its close button', async () => {
    const { page } = flow.browser;
    await openFromDrawer(page, 'Billing');
    await page.getByLabel('Month (UTC)').fill(previousUtcMonth());
    await flow.browser.settle(300, 3000);
    await page.getByRole('button', { name: 'Generate drafts' }).click();
    const row = page.locator('.v-data-table tbody tr', { hasText: DEMO_ACCOUNT }).first();
    await row.waitFor();
    expect(await page.locator('main').innerText()).not.toMatch(FOREIGN_DATE);
    await row.click();
    const close = page.locator('[data-test="close-statement"]');
    await close.waitFor();
    // The plan line's included units are grouped ("includes 50,000 units").
    expect(await page.locator('.v-dialog').innerText()).not.toMatch(/\d{5}/);
    await close.click();
    await close.waitFor({ state: 'detached' });
  }, 60_000);

  it('warns in the accounts form when the quota is below the plan’s included units', async () => {
    const { page } = flow.browser;
    await openFromDrawer(page, 'Accounts');
    await page.getByRole('button', { name: 'New account' }).click();
    const dialog = page.locator('.v-dialog .v-card', { hasText: 'New account' });
    await dialog.getByLabel('Monthly unit quota').fill('5000');
    await dialog.locator('[data-test="quota-warning"]').waitFor();
    await dialog.getByLabel('Monthly unit quota').fill('250000');
    await dialog.locator('[data-test="quota-warning"]').waitFor({ state: 'detached' });
    await dialog.getByRole('button', { name: 'Cancel' }).click();
  }, 60_000);

  it('links the API reference back to the console', async () => {
    const { page } = flow.browser;
    await page.goto(`${flow.server.origin}/docs/`);
    const back = page.getByRole('link', { name: /Back to the Ebullio console/ });
    await back.waitFor();
    await back.click();
    await page.getByRole('heading', { level: 1, name: 'Overview' }).waitFor();
  }, 60_000);

  it('saves every main view at a desktop and a phone size', async () => {
    const { page } = flow.browser;
    for (const [size, viewport] of [
      ['desktop', { width: 1440, height: 900 }],
      ['phone', { width: 390, height: 844 }],
    ] as const) {
      await page.setViewportSize(viewport);
      for (const [path, heading] of MAIN_VIEWS) {
        await page.goto(`${flow.server.origin}/console/${path}`);
        await page.getByRole('heading', { level: 1, name: heading }).waitFor();
        await flow.browser.settle(300, 4000);
        await screenshot(page, `${size}-${path || 'overview'}`);
        // Nothing wider than the screen: the page never scrolls sideways.
        const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
        expect(overflow, `${size} ${heading}`).toBeLessThanOrEqual(0);
      }
    }
    await page.setViewportSize({ width: 1366, height: 860 });
  }, 240_000);

  it('names the developer’s account in the request log instead of its number', async () => {
    const { page } = flow.browser;
    // A new person at the same browser: the admin's cookies go, the developer signs in.
    await flow.browser.context.clearCookies();
    await signIn(page, flow.server.origin, DEMO_DEVELOPER_EMAIL, DEMO_CONSOLE_PASSWORD);
    await openFromDrawer(page, 'Request log');
    const row = page.locator('.v-data-table tbody tr', { hasText: DEMO_ACCOUNT }).first();
    await row.waitFor();
    await row.click();
    const inspector = page.locator('[data-test="request-inspector"]', { hasText: 'Engine' });
    await inspector.waitFor();
    const text = await inspector.innerText();
    expect(text).toContain(DEMO_ACCOUNT);
    expect(text).not.toMatch(/\bAccount \d+\b/);
  }, 60_000);

  it('made no request outside the server origin and raised no page error', () => {
    expect(flow.browser.foreignRequests()).toEqual([]);
    expect(flow.browser.pageErrors).toEqual([]);
  });
});
