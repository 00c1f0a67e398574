// @vitest-environment node
// Serving the built console: SPA fallback, cache headers for hashed assets, 404 for missing files,
// 503 before a build. Checked against HTTP semantics (RFC 9110), caching (RFC 9111) and the
// `immutable` directive (RFC 8246). Section numbers below are from memory, not re-read.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import express, { type ErrorRequestHandler } from 'express';
import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createConsoleStaticModule } from '../../server/console/static.js';
import { ProblemError, sendProblem } from '../../server/http/problem.js';
import type { AppDeps } from '../../server/app.js';

const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'ebullio-console-'));
const built = path.join(tmp, 'built');
fs.mkdirSync(path.join(built, 'assets'), { recursive: true });
fs.writeFileSync(path.join(built, 'index.html'), '<!doctype html><div id="app"></div>');
fs.writeFileSync(path.join(built, 'assets', 'index-AbC123.js'), 'console.log(1)');
fs.writeFileSync(path.join(built, 'favicon.svg'), '<svg xmlns="http://www.w3.org/2000/svg"/>');

function appFor(distDir: string): express.Express {
  const app = express();
  createConsoleStaticModule(distDir).register(app, {} as AppDeps);
  const onError: ErrorRequestHandler = (err, _req, res, _next) => {
    if (err instanceof ProblemError) return sendProblem(res, err);
    res.status(500).end();
  };
  app.use(onError);
  return app;
}

afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

describe('console static serving', () => {
  const app = appFor(built);

  it('redirects the site root to the console', async () => {
    const res = await request(app).get('/');
    // RFC 9110 §15.4.3: 302 with a Location header.
    expect(res.status).toBe(302);
    expect(res.headers.location).toBe('/console/');
  });

  it('serves the app shell at /console/ and redirects the bare /console there', async () => {
    const shell = await request(app).get('/console/').set('Accept', 'text/html');
    expect(shell.status).toBe(200);
    expect(shell.text).toContain('<div id="app">');
    const bare = await request(app).get('/console?x=1');
    // RFC 9110 §15.4.2: 301 Moved Permanently with Location; the query string is kept.
    expect(bare.status).toBe(301);
    expect(bare.headers.location).toBe('/console/?x=1');
  });

  it('answers a deep console page with the app shell, uncached and under a same-origin CSP', async () => {
    const res = await request(app).get('/console/keys').set('Accept', 'text/html');
    expect(res.status).toBe(200);
    expect(res.text).toContain('<div id="app">');
    // RFC 9111 §5.2.2.4: no-cache = revalidate before reuse, so a new build is picked up at once.
    expect(res.headers['cache-control']).toBe('no-cache');
    // CSP Level 3 (W3C): default-src 'self' keeps every fetch on this origin.
    expect(res.headers['content-security-policy']).toContain("default-src 'self'");
    expect(res.headers['content-security-policy']).toContain("frame-ancestors 'none'");
  });

  it('caches content-hashed assets for a year as immutable', async () => {
    const res = await request(app).get('/console/assets/index-AbC123.js');
    expect(res.status).toBe(200);
    // RFC 9111 §5.2.2.1 max-age in seconds (365 × 86400); RFC 8246 §2 immutable.
    expect(res.headers['cache-control']).toBe('public, max-age=31536000, immutable');
  });

  it('serves the favicon from the build', async () => {
    const res = await request(app).get('/console/favicon.svg');
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^image\/svg\+xml/);
  });

  it('answers a missing asset with a 404 problem instead of the app shell', async () => {
    const res = await request(app).get('/console/assets/gone-123.js');
    expect(res.status).toBe(404);
    // RFC 9457 §3: problem details as application/problem+json.
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
  });
});

describe('console not built', () => {
  const app = appFor(path.join(tmp, 'missing'));

  it('tells a browser how to build the console with a 503 page', async () => {
    const res = await request(app).get('/console/').set('Accept', 'text/html');
    // RFC 9110 §15.6.4: 503 Service Unavailable, optionally with Retry-After (§10.2.3).
    expect(res.status).toBe(503);
    expect(res.headers['retry-after']).toBe('60');
    expect(res.text).toContain('npm run build');
  });

  it('answers a JSON client with a 503 problem', async () => {
    const res = await request(app).get('/console/overview').set('Accept', 'application/json');
    expect(res.status).toBe(503);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(res.body.title).toBe('Console not built');
  });
});
