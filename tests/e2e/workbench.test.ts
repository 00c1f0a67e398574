// Browser flow (developer): the workbench. Sign in, open the workbench, choose a key and the
// single-effect calculation, type the body pressure with its unit, run and read the result; a bad
// unit shows the API's message beside the field; a sweep of the body pressure plots a chart;
// "Copy as" shows the public request as curl with the key as a placeholder.
import { describe, expect, it } from 'vitest';
import {
  DEMO_CONSOLE_PASSWORD,
  DEMO_DEVELOPER_EMAIL,
  openFromDrawer,
  screenshot,
  setUpConsoleFlow,
  signIn,
} from './harness.js';

const flow = setUpConsoleFlow();

const field = (path: string) => flow.browser.page.locator(`[data-field="${path}"]`);

/** Chooses an entry of a Vuetify select by the text of its option. */
async function choose(select: string, option: RegExp): Promise<void> {
  const { page } = flow.browser;
  await page.locator(`[data-test="${select}"]`).click();
  await page.getByRole('option', { name: option }).first().click();
  await page.locator('.v-overlay--active .v-list').first().waitFor({ state: 'hidden' });
}

/** Clicks Run and returns the console API's answer (status and body). */
/** Scrolls to the top before a full-page screenshot, so the fixed app bar is drawn where it belongs. */
async function shoot(name: string): Promise<void> {
  const { page } = flow.browser;
  await page.evaluate(() => window.scrollTo(0, 0));
  await screenshot(page, name);
}

async function run(): Promise<{ status: number; body: Record<string, unknown> }> {
  const { page } = flow.browser;
  const answered = page.waitForResponse(
    (res) =>
      res.request().method() === 'POST' && new URL(res.url()).pathname === '/console-api/workbench/run',
  );
  await page.locator('[data-test="run"]').click();
  const res = await answered;
  return { status: res.status(), body: (await res.json()) as Record<string, unknown> };
}

describe('workbench: a calculation from the console with a key of one’s account', () => {
  it('opens the workbench with a key and the calculation chosen', async () => {
    const { page } = flow.browser;
    await signIn(page, flow.server.origin, DEMO_DEVELOPER_EMAIL, DEMO_CONSOLE_PASSWORD);
    await openFromDrawer(page, 'Workbench');
    await choose('workbench-key', /./);
    await choose('workbench-operation', /Single-effect evaporator/);
    // The form is generated from the contract and starts from the worked example.
    await field('body.pressure').locator('input').waitFor({ state: 'visible' });
    expect(await field('liquor').locator('input').inputValue()).toBe('sodium-hydroxide');
    await expect.poll(() => field('feed.massFlow').locator('input').inputValue()).toBe('4.5 t/h');
  }, 90_000);

  it('runs with a value typed with its unit and shows the result, warnings, cautions and provenance', async () => {
    const { page } = flow.browser;
    await field('body.pressure').locator('input').fill('20 kPa');
    await run();
    const answer = page.locator('[data-test="answer"]');
    await answer.waitFor({ state: 'visible' });
    await expect
      .poll(() => answer.locator('[data-test="answer-summary"]').innerText())
      .toMatch(/5 units charged/);
    const area = await page.locator('[data-result="area"]').innerText();
    expect(area).toMatch(/area\s+[\d.]+\s+m²/);
    await answer.locator('[data-test="answer-cautions"]').waitFor({ state: 'visible' });
    expect(await answer.locator('[data-test="answer-provenance"]').innerText()).toMatch(/iapws-if97/);
    await flow.browser.settle(300, 3000);
    await shoot('workbench-result');
  }, 60_000);

  it('shows the API’s message beside the field a bad value was typed in', async () => {
    const { page } = flow.browser;
    await field('body.pressure').locator('input').fill('20 furlongs');
    const answer = await run();
    expect(answer.status).toBe(422);
    const errors = answer.body.errors as { field: string; message: string }[];
    expect(errors.map((e) => e.field)).toEqual(['body.pressure']);
    await page.locator('[data-test="run-problem"]').waitFor({ state: 'visible' });
    // The API's own message replaces the field's hint (the unit and range it takes).
    const message = field('body.pressure').locator('.v-messages__message', { hasText: errors[0]!.message });
    await message.waitFor({ state: 'visible' });
    expect(await page.locator('[data-test="answer"]').count()).toBe(0);
    await shoot('workbench-field-problem');
  }, 60_000);

  it('sweeps the body pressure over a range and plots the chosen results', async () => {
    const { page } = flow.browser;
    await field('body.pressure').locator('input').fill('20 kPa');
    await page.locator('[data-test="mode-sweep"]').click();
    await page.locator('[data-test="sweep-settings"]').waitFor({ state: 'visible' });
    const varied = page.getByRole('combobox', { name: 'Varied field' });
    await varied.fill('body.pressure');
    await page
      .getByRole('option', { name: /^body\.pressure/ })
      .first()
      .click();
    // The list may stay open while the field keeps focus: close it before typing the range.
    const list = page.locator('.v-overlay--active .v-list').first();
    if (await list.isVisible()) await varied.press('Escape');
    await list.waitFor({ state: 'hidden' });
    await page.locator('[data-test="sweep-from"] input').fill('15');
    await page.locator('[data-test="sweep-to"] input').fill('40');
    await page.locator('[data-test="sweep-steps"] input').fill('6');
    const answer = await run();
    expect(answer.status).toBe(200);
    expect((answer.body.request as { body: { vary: unknown[] } }).body.vary).toEqual([
      { field: 'body.pressure', from: 15, to: 40, steps: 6 },
    ]);
    const summary = page.locator('[data-test="answer-summary"]');
    await expect.poll(() => summary.innerText()).toMatch(/6 points, 6 answered, 0 refused/);
    const charts = page.locator('[data-chart] canvas');
    await charts.first().waitFor({ state: 'visible' });
    expect(await charts.count()).toBeGreaterThanOrEqual(1);
    expect(await page.locator('[data-test="sweep-rows"] tbody tr').count()).toBe(6);
    await flow.browser.settle(300, 3000);
    await shoot('workbench-sweep');
  }, 60_000);

  it('copies the request as curl, with the key as a placeholder and never a secret', async () => {
    const { page } = flow.browser;
    await page.locator('[data-test="mode-single"]').click();
    await page.evaluate(() => window.scrollTo(0, 0));
    await page.locator('[data-test="copy-as-open"]').click();
    const snippet = page.locator('[data-test="snippet"]');
    await snippet.waitFor({ state: 'visible' });
    const curl = await snippet.innerText();
    expect(curl).toContain(`curl -sS -X POST '${flow.server.origin}/v1/evaporators/single-effect'`);
    expect(curl).toContain('Authorization: Bearer $EBULLIO_API_KEY');
    expect(curl).toContain('"pressure": "20 kPa"');
    expect(curl).not.toContain(flow.server.apiKey);
    await screenshot(page, 'workbench-copy-as');
    await page.locator('[data-test="copy-as-typescript"]').click();
    await expect.poll(() => snippet.innerText()).toContain('createEbullioClient');
    await page.locator('[data-test="copy-as-python"]').click();
    await expect.poll(() => snippet.innerText()).toContain('urllib.request');
  }, 60_000);

  it('made no request outside the server origin and raised no page error', () => {
    expect(flow.browser.foreignRequests()).toEqual([]);
    expect(flow.browser.pageErrors).toEqual([]);
  });
});
