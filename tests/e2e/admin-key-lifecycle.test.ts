// Browser flow 1 (admin): sign in, create an account and an API key in the console, call the
// calculation API with the key's one-time secret, find that call in the request log by its
// request id, revoke the key in the console and see the API refuse it.
import crypto from 'node:crypto';
import { describe, expect, it } from 'vitest';
import {
  ADMIN_EMAIL,
  ADMIN_PASSWORD,
  openFromDrawer,
  screenshot,
  setUpConsoleFlow,
  signIn,
} from './harness.js';

const flow = setUpConsoleFlow();

/** Invented case: a caustic concentrator taking 1.5 kg/s of 10 % liquor at 60 °C to 30 %, body
 * at 20 kPa, heated by steam at 3 barg, U = 1800 W/(m²·K). */
const causticCase = {
  liquor: 'sodium-hydroxide',
  feed: { massFlow: 1.5, massFraction: 0.1, temperature: 60 },
  product: { massFraction: 0.3 },
  steam: { pressure: '3 barg' },
  body: { pressure: 20, overallHeatTransferCoefficient: 1800 },
};

const ACCOUNT = 'Kestrel Valley Caustic Recovery';
const KEY_NAME = 'e2e evaporator sizing script';

async function callSingleEffect(secret: string, requestId: string) {
  return fetch(`${flow.server.origin}/v1/evaporators/single-effect`, {
    method: 'POST',
    headers: {
      // RFC 6750 §2.1: the bearer token in the Authorization header.
      Authorization: `Bearer ${secret}`,
      'Content-Type': 'application/json',
      'X-Request-Id': requestId,
    },
    body: JSON.stringify(causticCase),
  });
}

describe('admin: account, key, API call, request log, revocation', () => {
  let secret = '';
  const requestId = crypto.randomUUID();

  it('signs in as admin and shows the overview', async () => {
    const { page } = flow.browser;
    await signIn(page, flow.server.origin, ADMIN_EMAIL, ADMIN_PASSWORD);
    await page.getByRole('heading', { level: 1, name: 'Overview' }).waitFor();
    await flow.browser.settle(300, 3000);
    await screenshot(page, 'overview');
  }, 60_000);

  it('creates an account in the accounts view', async () => {
    const { page } = flow.browser;
    await openFromDrawer(page, 'Accounts');
    await page.getByRole('button', { name: 'New account' }).click();
    const dialog = page.locator('.v-dialog .v-card', { hasText: 'New account' });
    await dialog.getByLabel('Name').fill(ACCOUNT);
    await dialog.getByLabel('Billing e-mail (optional)').fill('plant-accounts@kestrel-valley.invalid');
    await dialog.getByRole('button', { name: 'Create' }).click();
    await page.locator('.v-data-table tbody tr', { hasText: ACCOUNT }).waitFor();
    // The page as the admin sees it once the dialog has closed, not during its fade.
    await dialog.waitFor({ state: 'detached' });
    await screenshot(page, 'accounts');
  }, 60_000);

  it('makes the account’s callback signing secret and shows it once', async () => {
    const { page } = flow.browser;
    const row = page.locator('.v-data-table tbody tr', { hasText: ACCOUNT });
    await row.locator('[data-test="signing-secret"]').click();
    const dialog = page.locator('.v-dialog .v-card', { hasText: 'Callback signing secret' });
    await dialog.getByRole('button', { name: 'Make secret' }).click();
    const field = dialog.getByLabel('Signing secret');
    await field.waitFor();
    expect((await field.inputValue()).length).toBeGreaterThanOrEqual(32);
    await screenshot(page, 'accounts-signing-secret');
    await dialog.getByRole('button', { name: 'Done' }).click();
    await dialog.waitFor({ state: 'detached' });
  }, 60_000);

  it('creates a key for that account and shows its secret once', async () => {
    const { page } = flow.browser;
    await openFromDrawer(page, 'API keys');
    await page.getByRole('button', { name: 'New key' }).click();
    const dialog = page.locator('.v-dialog .v-card', { hasText: 'New API key' });
    await dialog.locator('.v-select', { hasText: 'Account' }).click();
    await page.locator('.v-overlay--active .v-list-item', { hasText: ACCOUNT }).click();
    await dialog.getByLabel('Name').fill(KEY_NAME);
    await dialog.getByRole('button', { name: 'Create key' }).click();
    const field = page.locator('[data-test="secret-value"] input');
    await field.waitFor();
    secret = await field.inputValue();
    // The bootstrap-key pattern of server/config.ts, which every Ebullio key follows.
    expect(secret).toMatch(/^[A-Za-z0-9_.-]{32,256}$/);
    await page.locator('[data-test="close-secret"]').click();
    await page.locator('[data-test="secret-dialog"]').waitFor({ state: 'detached' });
    const row = page.locator('.v-data-table tbody tr', { hasText: KEY_NAME });
    await row.waitFor();
    expect(await row.textContent()).toContain('active');
    // Once closed, the secret is nowhere on the page.
    expect(await page.content()).not.toContain(secret);
    await screenshot(page, 'keys');
  }, 60_000);

  it('calls the calculation API with the new key', async () => {
    const res = await callSingleEffect(secret, requestId);
    expect(res.status).toBe(200);
    expect(res.headers.get('x-request-id')).toBe(requestId);
    const body = (await res.json()) as { vapor: { massFlow: number }; product: { massFlow: number } };
    // Solute and total mass balances (exact): L = F·x_F/x_P = 0.5 kg/s, V = F − L = 1.0 kg/s.
    expect(body.product.massFlow).toBeCloseTo(0.5, 6);
    expect(body.vapor.massFlow).toBeCloseTo(1.0, 6);
  });

  it('finds the call in the request log by its request id', async () => {
    const { page } = flow.browser;
    await openFromDrawer(page, 'Request log');
    await page.locator('.filter-bar').getByRole('textbox', { name: 'Request id' }).fill(requestId);
    await page.getByRole('button', { name: 'Apply' }).click();
    const rows = page.locator('.v-data-table tbody tr', { hasText: requestId.slice(0, 8) });
    await rows.first().waitFor();
    expect(await rows.count()).toBe(1);
    const text = (await rows.first().textContent()) ?? '';
    expect(text).toContain('/v1/evaporators/single-effect');
    expect(text).toContain('200');
    await rows.first().click();
    // The inspector opens under the table, full width, and names the request it shows.
    const inspector = page.locator('[data-test="request-inspector"]', { hasText: requestId });
    await inspector.waitFor();
    await inspector.locator('[data-test="facts"]').waitFor();
    await screenshot(page, 'request-log');
    // The same inspector on a phone: facts and bodies stack under the table.
    await page.setViewportSize({ width: 390, height: 844 });
    await inspector.scrollIntoViewIfNeeded();
    await screenshot(page, 'request-log-phone');
    await page.setViewportSize({ width: 1440, height: 900 });
    await screenshot(page, 'request-log-desktop');
    await page.setViewportSize({ width: 1366, height: 860 });
  }, 60_000);

  it('revokes the key in the console, after which the API answers 401', async () => {
    const { page } = flow.browser;
    await page.keyboard.press('Escape');
    await openFromDrawer(page, 'API keys');
    await page.getByRole('button', { name: `Revoke ${KEY_NAME}` }).click();
    await page
      .locator('.v-dialog .v-card', { hasText: 'Revoke this key?' })
      .getByRole('button', { name: 'Revoke', exact: true })
      .click();
    await page.locator('.v-data-table tbody tr', { hasText: KEY_NAME }).waitFor({ state: 'detached' });
    const res = await callSingleEffect(secret, crypto.randomUUID());
    // RFC 9110 §15.5.2: 401 when the credentials are not valid; problem details per RFC 9457.
    expect(res.status).toBe(401);
    expect(res.headers.get('content-type')).toMatch(/application\/problem\+json/);
  }, 60_000);

  it('saves the remaining admin views', async () => {
    const { page } = flow.browser;
    for (const [title, file] of [
      ['Usage', 'usage'],
      ['Liquor library', 'liquor-library'],
      ['People', 'users'],
      ['Audit trail', 'audit'],
      ['Outbox', 'outbox'],
    ] as const) {
      await openFromDrawer(page, title);
      await flow.browser.settle(300, 3000);
      await screenshot(page, file);
    }
    // The audit trail names the revocation this flow just made.
    await openFromDrawer(page, 'Audit trail');
    await page.locator('text=/revoke/i').first().waitFor();
  }, 90_000);

  it('made no request outside the server origin and raised no page error', () => {
    expect(flow.browser.requests.some((u) => u.includes('/console/assets/'))).toBe(true);
    expect(flow.browser.foreignRequests()).toEqual([]);
    expect(flow.browser.pageErrors).toEqual([]);
    // Before sign-in the console asks who is signed in and tries a refresh: both 401 (no session).
    const unexpected = flow.browser.failedResponses.filter(
      (r) => !/^401 (GET|POST) \S+\/console-api\/auth\/(me|refresh)$/.test(r),
    );
    expect(unexpected).toEqual([]);
  });
});
