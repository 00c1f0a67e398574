// Browser flow 3 (developer): the navigation offers only the developer's pages, and the console
// API refuses the admin and billing areas to the developer's own session with 403.
import { describe, expect, it } from 'vitest';
import {
  DEMO_CONSOLE_PASSWORD,
  DEMO_DEVELOPER_EMAIL,
  drawerTitles,
  screenshot,
  setUpConsoleFlow,
  signIn,
} from './harness.js';

const flow = setUpConsoleFlow();

/** Pages and console API areas outside the developer role (issue 4, role rules). */
const ADMIN_PAGES = ['Accounts', 'Billing', 'Liquor library', 'People', 'Audit trail', 'Outbox'];
const REFUSED_CALLS = [
  '/console-api/accounts',
  '/console-api/users',
  '/console-api/audit',
  '/console-api/outbox',
  '/console-api/plans',
  '/console-api/statements',
];

describe('developer: only keys, usage and the request log of their accounts', () => {
  it('shows no admin or billing page in the navigation', async () => {
    const { page } = flow.browser;
    await signIn(page, flow.server.origin, DEMO_DEVELOPER_EMAIL, DEMO_CONSOLE_PASSWORD);
    await page.getByRole('heading', { level: 1, name: 'Overview' }).waitFor();
    const titles = await drawerTitles(page);
    expect(titles).toEqual(expect.arrayContaining(['API keys', 'Request log', 'Usage']));
    for (const title of ADMIN_PAGES) expect(titles).not.toContain(title);
    await flow.browser.settle(300, 3000);
    await screenshot(page, 'developer-navigation');
  }, 60_000);

  it('is refused the admin and billing console API with 403 problem details', async () => {
    const results = await flow.browser.page.evaluate(async (paths) => {
      const out: { path: string; status: number; type: string | null; contentType: string | null }[] = [];
      for (const path of paths) {
        const res = await fetch(path, { credentials: 'same-origin' });
        const body = (await res.json().catch(() => ({}))) as { type?: string };
        out.push({
          path,
          status: res.status,
          type: body.type ?? null,
          contentType: res.headers.get('content-type'),
        });
      }
      return out;
    }, REFUSED_CALLS);
    for (const r of results) {
      // RFC 9110 §15.5.4: 403 when the server understood the request but refuses it to this
      // (authenticated) user; the body is an RFC 9457 problem document.
      expect(r, r.path).toMatchObject({ status: 403, type: '/problems/forbidden' });
      expect(r.contentType, r.path).toMatch(/application\/problem\+json/);
    }
  });

  it('still reaches its own keys through the same session (the refusals are by role, not a broken session)', async () => {
    const status = await flow.browser.page.evaluate(async () => (await fetch('/console-api/keys')).status);
    expect(status).toBe(200);
  });

  it('sends the developer to the no-access page when an admin page is typed into the address bar', async () => {
    const { page } = flow.browser;
    await page.goto(`${flow.server.origin}/console/users`);
    await page.waitForURL(/\/console\/no-access/);
    await page.getByText('Not for your role').first().waitFor();
    expect(await page.getByRole('heading', { level: 1, name: 'People' }).count()).toBe(0);
  }, 30_000);

  it('made no request outside the server origin', () => {
    expect(flow.browser.foreignRequests()).toEqual([]);
    expect(flow.browser.pageErrors).toEqual([]);
  });
});
