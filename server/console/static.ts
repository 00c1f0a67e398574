/**
 * Serves the built console (`npm run build` → console/dist) at /console.
 *
 * - `/` redirects to `/console/`, `/console` to `/console/`.
 * - `/console/assets/*` are Vite's content-hashed files: cached for a year, `immutable`.
 * - Other files in dist (favicon) are served with revalidation.
 * - Any other path under /console/ without a file extension is a console page: index.html
 *   (the SPA fallback; the Vue router takes it from there), never cached, with a Content Security
 *   Policy that allows only this origin (the console loads no fonts, icons or scripts from
 *   anywhere else).
 * - A missing asset is a 404 problem, not index.html.
 * - If the console has not been built, pages answer 503 with a page that says how to build it.
 */
import fs from 'node:fs';
import path from 'node:path';
import express from 'express';
import type { AppModule } from '../deps.js';
import { problem, ProblemError } from '../http/problem.js';

export const CONSOLE_DIST = path.resolve(import.meta.dirname, '../../console/dist');

/** Vuetify writes its theme into a <style> element, hence 'unsafe-inline' for styles only. */
export const CONSOLE_CSP = [
  "default-src 'self'",
  "script-src 'self'",
  "style-src 'self' 'unsafe-inline'",
  "img-src 'self' data: blob:",
  "font-src 'self' data:",
  "connect-src 'self'",
  "object-src 'none'",
  "base-uri 'self'",
  "form-action 'self'",
  "frame-ancestors 'none'",
].join('; ');

const NOT_BUILT_HTML =
  '<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Console not built · Ebullio</title></head>' +
  '<body style="font-family:sans-serif;max-width:40rem;margin:4rem auto;line-height:1.5">' +
  '<h1>The Ebullio console has not been built</h1>' +
  '<p>The API is running, but there is no console build to serve. Build it with</p>' +
  '<pre>npm run build</pre><p>and reload this page. The API itself works without it: see <a href="/docs">/docs</a>.</p>' +
  '</body></html>';

export function createConsoleStaticModule(distDir: string = CONSOLE_DIST): AppModule {
  const indexFile = path.join(distDir, 'index.html');
  return {
    register(app) {
      app.get('/', (_req, res) => res.redirect(302, '/console/'));
      app.get('/console', (req, res, next) => {
        // Express routing ignores a trailing slash: only the bare /console is redirected.
        if (req.path.endsWith('/')) return next();
        const query = req.originalUrl.includes('?')
          ? req.originalUrl.slice(req.originalUrl.indexOf('?'))
          : '';
        res.redirect(301, `/console/${query}`);
      });

      app.use(
        '/console/assets',
        express.static(path.join(distDir, 'assets'), {
          immutable: true,
          maxAge: '365d',
          index: false,
          fallthrough: true,
        }),
      );
      app.use('/console', express.static(distDir, { index: false, maxAge: 0, fallthrough: true }));

      app.get('/console/{*splat}', (req, res) => {
        // A file name that did not match a file: a real 404, not the app shell.
        if (/\.[A-Za-z0-9]{1,8}$/.test(req.path)) {
          throw problem('not-found', `No console file at ${req.path}.`);
        }
        if (!fs.existsSync(indexFile)) {
          if (req.accepts(['text/html', 'application/json']) === 'text/html') {
            res.status(503).type('text/html').setHeader('Retry-After', '60').send(NOT_BUILT_HTML);
            return;
          }
          throw new ProblemError({
            status: 503,
            type: 'internal',
            title: 'Console not built',
            detail: 'There is no console build in console/dist; run "npm run build".',
            headers: { 'Retry-After': '60' },
          });
        }
        res.setHeader('Cache-Control', 'no-cache');
        res.setHeader('Content-Security-Policy', CONSOLE_CSP);
        res.setHeader('X-Content-Type-Options', 'nosniff');
        res.setHeader('Referrer-Policy', 'same-origin');
        res.sendFile(indexFile);
      });
    },
  };
}

export const consoleStaticModule = createConsoleStaticModule();
