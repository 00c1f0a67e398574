// The browser-test harness against the API alone: the real server process answers /readyz, and
// Debian's Chromium renders the API docs page from the server's own origin (no CDN request).
import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openBrowser, screenshot, startServer, type BrowserSession, type RunningServer } from './harness.js';

let server: RunningServer;
let browser: BrowserSession;

beforeAll(async () => {
  server = await startServer();
  browser = await openBrowser(server.origin);
}, 60_000);

afterAll(async () => {
  await browser?.close();
  // Graceful shutdown ends with exit code 0 (server/main.ts: SIGTERM → close → exit 0).
  if (server) expect(await server.stop()).toBe(0);
}, 30_000);

describe('browser-test harness', () => {
  it('starts the real server on a temp database and reports ready with the engine version', async () => {
    const res = await fetch(`${server.origin}/readyz`);
    expect(res.status).toBe(200);
    const body = (await res.json()) as { status: string; engineVersion: string };
    expect(body.status).toBe('ready');
    expect(body.engineVersion).toMatch(/^ebullio-/);
  });

  it('accepts the bootstrap API key as a Bearer token (RFC 6750 §2.1)', async () => {
    // RFC 6750 §2.1: "Authorization: Bearer <token>".
    const res = await fetch(`${server.origin}/v1/usage`, {
      headers: { Authorization: `Bearer ${server.apiKey}` },
    });
    expect(res.status).toBe(200);
  });

  it('renders the API docs in Chromium without any request outside the server origin', async () => {
    const { page } = browser;
    const res = await page.goto(`${server.origin}/docs/`, { waitUntil: 'networkidle' });
    expect(res?.status()).toBe(200);
    // Swagger UI builds its operation list from /openapi.json: wait until an operation shows.
    await page.waitForSelector('.opblock', { timeout: 15_000 });
    const file = await screenshot(page, 'api-docs');
    expect(fs.statSync(file).size).toBeGreaterThan(10_000);
    expect(browser.requests.length).toBeGreaterThan(1);
    expect(browser.foreignRequests()).toEqual([]);
  }, 30_000);
});

describe('development services started by server/main.ts', () => {
  it('runs the SMTP capture server on the given port, greeting with reply code 220', async () => {
    const net = await import('node:net');
    const greeting = await new Promise<string>((resolve, reject) => {
      const socket = net.connect(server.smtpPort, '127.0.0.1');
      socket.once('data', (d) => {
        resolve(d.toString());
        socket.end('QUIT\r\n');
      });
      socket.once('error', reject);
    });
    // RFC 5321 §4.2 and §3.1: the server opens the session with a "220 <domain> …" service-ready reply.
    expect(greeting).toMatch(/^220 /);
    expect(server.output()).toContain('development mail capture on smtp://127.0.0.1:');
  });

  it('runs the fake payment provider, answering an unknown invoice with the provider error shape', async () => {
    const res = await fetch(`http://127.0.0.1:${server.paymentsPort}/v1/invoices/inv-missing`, {
      headers: { Authorization: 'Bearer ebpay_dev_key_local' },
    });
    // Stripe API reference, "Errors": 4xx with {"error": {"type": "invalid_request_error", "message": …}}.
    expect(res.status).toBe(404);
    const body = (await res.json()) as { error: { type: string; message: string } };
    expect(body.error.type).toBe('invalid_request_error');
  });
});
