/**
 * Browser-test harness: the real server process (`node --import tsx server/main.ts`) on a free port with a temp
 * database, and Debian's Chromium driven by playwright-core (never a downloaded browser).
 *
 * - `ensureConsoleBuilt()` runs `npm run build` when console/dist is missing or older than its sources.
 * - `startServer()` spawns the server with a bootstrap API key and admin, the development mail
 *   capture and fake payment provider enabled, and waits for /readyz.
 * - `openBrowser(origin)` launches Chromium with a fresh profile and records every request the
 *   page makes, so a test can assert that none leaves the server's origin.
 * - `screenshot(page, name)` saves test-results/screenshots/<name>.png (git-ignored).
 * - `setUpConsoleFlow()` registers a console flow's beforeAll/afterAll: all of the above, then
 *   closing the browser and stopping the server.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { ensureConsoleBuilt } from '../support/console-build.js';
import { afterAll, afterEach, beforeAll } from 'vitest';
export {
  DEMO_BILLING_EMAIL,
  DEMO_CONSOLE_PASSWORD,
  DEMO_DEVELOPER_EMAIL,
} from '../../server/accounts/demo-users.js';

export const ROOT = path.resolve(import.meta.dirname, '../..');
export const CHROMIUM = '/usr/bin/chromium';
export const SCREENSHOT_DIR = path.join(ROOT, 'test-results', 'screenshots');

export const ADMIN_EMAIL = 'e2e-admin@ebullio.invalid';
export const ADMIN_PASSWORD = 'e2e admin passphrase 4711';

/**
 * `count` distinct free TCP ports on 127.0.0.1. The kernel picks each; all are held open until the
 * last is picked and then released together, because a port released at once can be handed out
 * again by the next pick (the HTTP and SMTP ports of one server once came out equal).
 */
export async function freePorts(count: number): Promise<number[]> {
  const servers = await Promise.all(
    Array.from(
      { length: count },
      () =>
        new Promise<net.Server>((resolve, reject) => {
          const srv = net.createServer();
          srv.unref();
          srv.on('error', reject);
          srv.listen(0, '127.0.0.1', () => resolve(srv));
        }),
    ),
  );
  const ports = servers.map((srv) => {
    const address = srv.address();
    return typeof address === 'object' && address ? address.port : 0;
  });
  await Promise.all(servers.map((srv) => new Promise<void>((resolve) => srv.close(() => resolve()))));
  return ports;
}

export { ensureConsoleBuilt };

export interface RunningServer {
  origin: string;
  port: number;
  dir: string;
  dbFile: string;
  apiKey: string;
  /** Ports of the development stand-ins given to the server. */
  smtpPort: number;
  paymentsPort: number;
  child: ChildProcess;
  output(): string;
  stop(): Promise<number | null>;
}

/** Polls `url` until it answers 200 or the deadline passes. */
export async function waitFor200(url: string, timeoutMs: number, isDead: () => string | undefined) {
  const deadline = Date.now() + timeoutMs;
  let last = '';
  while (Date.now() < deadline) {
    const dead = isDead();
    if (dead !== undefined) throw new Error(dead);
    try {
      const res = await fetch(url);
      if (res.status === 200) return;
      last = `HTTP ${res.status}`;
    } catch (err) {
      last = (err as Error).message;
    }
    await new Promise((r) => setTimeout(r, 150));
  }
  throw new Error(`${url} not ready after ${timeoutMs} ms (${last})`);
}

export async function startServer(extraEnv: Record<string, string> = {}): Promise<RunningServer> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-e2e-'));
  const dbFile = path.join(dir, 'e2e.db');
  const [port, smtpPort] = (await freePorts(2)) as [number, number];
  // BOOTSTRAP_API_KEY: 32–256 chars of [A-Za-z0-9_.-] (server/config.ts).
  const apiKey = `ebl_live_E2eBootstrap_${crypto.randomBytes(18).toString('base64url')}`;
  const env: Record<string, string> = {
    ...(process.env as Record<string, string>),
    NODE_ENV: 'development',
    PORT: String(port),
    DB_FILE: dbFile,
    BOOTSTRAP_API_KEY: apiKey,
    BOOTSTRAP_ADMIN_EMAIL: ADMIN_EMAIL,
    BOOTSTRAP_ADMIN_PASSWORD: ADMIN_PASSWORD,
    // Development stand-ins started by server/main.ts: the SMTP capture server and the fake payment
    // provider (which pays each finalized invoice and sends the signed webhook). The capture's port
    // is picked here; the fake takes any free port (port 0, the default) and main.ts points the
    // payments client at it, so the billing tests also check that wiring.
    MAIL_CAPTURE: '1',
    MAIL_CAPTURE_PORT: String(smtpPort),
    SMTP_URL: '',
    PAYMENTS_API_BASE: 'http://127.0.0.1:0',
    FAKE_PAYMENTS: '1',
    FAKE_PAYMENTS_AUTOPAY: '1',
    // server/accounts/demo-users.ts: a billing user and a developer on the demo account.
    DEMO_CONSOLE_USERS: '1',
    ...extraEnv,
  };
  // One node process, as npm start runs it: the tsx command would SIGKILL a server slow to
  // acknowledge SIGTERM, cutting its drain short.
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
    cwd: ROOT,
    env,
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let output = '';
  let exitCode: number | null | undefined;
  child.stdout?.on('data', (d: Buffer) => (output += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (output += d.toString()));
  const exited = new Promise<number | null>((resolve) =>
    child.on('exit', (code) => {
      exitCode = code;
      resolve(code);
    }),
  );
  const origin = `http://127.0.0.1:${port}`;
  const dead = () => (exitCode !== undefined ? `server exited early (${exitCode}):\n${output}` : undefined);
  await waitFor200(`${origin}/readyz`, 30_000, dead);
  // main.ts logs the URL once the development services are up too.
  for (const deadline = Date.now() + 15_000; !/listening on http:/.test(output);) {
    const why = dead();
    if (why !== undefined) throw new Error(why);
    if (Date.now() > deadline) throw new Error(`server did not log its URL:\n${output}`);
    await new Promise((r) => setTimeout(r, 50));
  }
  const fakeAt = /development fake payment provider on http:\/\/127\.0\.0\.1:(\d+)/.exec(output);
  if (!fakeAt?.[1]) throw new Error(`the fake payment provider did not start:\n${output}`);
  const paymentsPort = Number(fakeAt[1]);
  return {
    origin,
    port,
    dir,
    dbFile,
    apiKey,
    smtpPort,
    paymentsPort,
    child,
    output: () => output,
    async stop() {
      if (exitCode === undefined) {
        child.kill('SIGTERM');
        const timer = setTimeout(() => child.kill('SIGKILL'), 12_000);
        const code = await exited;
        clearTimeout(timer);
        fs.rmSync(dir, { recursive: true, force: true });
        return code;
      }
      fs.rmSync(dir, { recursive: true, force: true });
      return exitCode;
    },
  };
}

export interface BrowserSession {
  context: BrowserContext;
  page: Page;
  /** Every URL the page requested (documents, scripts, styles, fonts, XHR/fetch, images). */
  requests: string[];
  /** Requests whose origin differs from the server's (should stay empty). */
  foreignRequests(): string[];
  /** Console errors and uncaught page errors (failed loads are in `failedResponses`). */
  pageErrors: string[];
  /** "<status> <method> <url>" of every response ≥ 400 the page received. */
  failedResponses: string[];
  /** Waits until no request of the page has been in flight for `quietMs` (at most `timeoutMs`). */
  settle(quietMs?: number, timeoutMs?: number): Promise<void>;
  close(): Promise<void>;
}

export async function openBrowser(origin: string): Promise<BrowserSession> {
  if (!fs.existsSync(CHROMIUM)) {
    // Fail, not skip: .ci/run installs Debian's chromium.
    throw new Error(`${CHROMIUM} is missing: install Debian's chromium (apt-get install chromium)`);
  }
  const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    viewport: { width: 1366, height: 860 },
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--no-first-run',
      // Shared memory in /tmp rather than /dev/shm, which a container may cap at 64 MB; a tab that
      // runs out of it crashes and leaves a blank page (common practice for Chromium in containers).
      '--disable-dev-shm-usage',
    ],
  });
  const requests: string[] = [];
  const pageErrors: string[] = [];
  const failedResponses: string[] = [];
  let inFlight = 0;
  let lastChange = Date.now();
  const done = () => {
    inFlight = Math.max(0, inFlight - 1);
    lastChange = Date.now();
  };
  context.on('request', (req) => {
    requests.push(req.url());
    inFlight++;
    lastChange = Date.now();
  });
  context.on('requestfinished', done);
  context.on('requestfailed', done);
  context.on('response', (res) => {
    if (res.status() >= 400) failedResponses.push(`${res.status()} ${res.request().method()} ${res.url()}`);
  });
  const page = context.pages()[0] ?? (await context.newPage());
  // Playwright's own default, set explicitly: on the 2-core CI machine the browser shares the cores
  // with the server under test and another test worker (a sign-in once took longer than 10 s).
  page.setDefaultTimeout(30_000);
  page.on('pageerror', (err) => pageErrors.push(err.message));
  page.on('crash', () => pageErrors.push(`the page crashed at ${page.url()}`));
  page.on('console', (msg) => {
    if (msg.type() === 'error' && !msg.text().startsWith('Failed to load resource'))
      pageErrors.push(msg.text());
  });
  const allowed = new URL(origin).origin;
  return {
    context,
    page,
    requests,
    pageErrors,
    failedResponses,
    async settle(quietMs = 400, timeoutMs = 10_000) {
      const deadline = Date.now() + timeoutMs;
      while (Date.now() < deadline) {
        if (inFlight === 0 && Date.now() - lastChange >= quietMs) return;
        await new Promise((r) => setTimeout(r, 50));
      }
    },
    foreignRequests: () =>
      requests.filter((u) => {
        // data: and blob: URLs are produced inside the page (inline fonts, chart canvases).
        if (u.startsWith('data:') || u.startsWith('blob:')) return false;
        try {
          return new URL(u).origin !== allowed;
        } catch {
          return true;
        }
      }),
    async close() {
      await context.close();
      fs.rmSync(profile, { recursive: true, force: true });
    },
  };
}

/** Saves a full-page screenshot as test-results/screenshots/<name>.png and returns its path. */
/** The server and browser of one console browser flow (set once its beforeAll has run). */
export interface ConsoleFlow {
  server: RunningServer;
  browser: BrowserSession;
}

/**
 * Registers the hooks of a console browser flow: before all tests, build the console when missing,
 * start the server and open Chromium on it; after all tests, close the browser and stop the server.
 */
export function setUpConsoleFlow(): ConsoleFlow {
  const flow = {} as ConsoleFlow;
  beforeAll(async () => {
    ensureConsoleBuilt();
    flow.server = await startServer();
    flow.browser = await openBrowser(flow.server.origin);
  }, 240_000);
  // A failed step prints what the server and the page reported, for a CI log read after the fact.
  afterEach((context) => {
    if (context.task.result?.state !== 'fail' || !flow.server) return;
    console.error(
      [
        `--- ${context.task.name}: diagnostics`,
        `page errors: ${JSON.stringify(flow.browser?.pageErrors ?? [])}`,
        `responses >= 400: ${JSON.stringify(flow.browser?.failedResponses ?? [])}`,
        `server output (last 3000 characters):\n${flow.server.output().slice(-3000)}`,
      ].join('\n'),
    );
  });
  afterAll(async () => {
    await flow.browser?.close();
    await flow.server?.stop();
  }, 30_000);
  return flow;
}

export async function screenshot(page: Page, name: string): Promise<string> {
  fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
  const file = path.join(SCREENSHOT_DIR, `${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}

/**
 * Signs in through the console's sign-in page and waits for the signed-in layout. A refused
 * sign-in, or a layout that never appears, fails with what the page showed, so a failure on the
 * CI machine can be read from its log alone.
 */
export async function signIn(page: Page, origin: string, email: string, password: string): Promise<void> {
  await page.goto(`${origin}/console/`);
  // On a loaded machine the app may still be redirecting to the sign-in page and mounting it when
  // the fields are first found: let it settle, and type again if a re-render emptied a field, so
  // the click always submits what was typed.
  await page.waitForURL(/\/console\/sign-in/);
  await page.getByRole('button', { name: 'Sign in' }).waitFor();
  const emailField = page.getByLabel('E-mail');
  const passwordField = page.getByLabel('Password', { exact: true });
  for (let attempt = 0; attempt < 3; attempt++) {
    await emailField.fill(email);
    await passwordField.fill(password);
    if ((await emailField.inputValue()) === email && (await passwordField.inputValue()) === password) break;
  }
  const answer = page.waitForResponse(
    (res) => res.request().method() === 'POST' && new URL(res.url()).pathname === '/console-api/auth/sign-in',
  );
  await page.getByRole('button', { name: 'Sign in' }).click();
  const res = await answer;
  if (res.status() !== 200) {
    throw new Error(`sign-in as ${email} answered ${res.status()}: ${await res.text()}`);
  }
  try {
    await page.locator('.v-navigation-drawer').first().waitFor({ state: 'visible' });
  } catch (err) {
    const text = await page
      .locator('body')
      .innerText()
      .catch(() => '(no body)');
    throw new Error(
      `signed in as ${email} (200), but no navigation drawer appeared; page ${page.url()} shows: ${text.slice(0, 600)}`,
      { cause: err },
    );
  }
}

/** Opens a page through the navigation drawer and waits for its heading. */
export async function openFromDrawer(page: Page, title: string, heading = title): Promise<void> {
  await page.locator('.v-navigation-drawer .v-list-item', { hasText: title }).first().click();
  await page.getByRole('heading', { level: 1, name: heading }).waitFor();
}

/** The titles in the navigation drawer, in order. */
export async function drawerTitles(page: Page): Promise<string[]> {
  return (await page.locator('.v-navigation-drawer .v-list-item-title').allTextContents()).map((t) =>
    t.trim(),
  );
}
