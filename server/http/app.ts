/**
 * The Express app factory. `createHttpApp(deps, modules)` builds the app without listening;
 * `server/app.ts` composes it with the service's modules for main.ts and the tests.
 *
 * Pipeline: X-Request-Id → /healthz, /readyz, /problems/:slug → /v1 (API key → metering → rate
 * limit → body → operations) → the modules given → 404 problem → error handler.
 */
import express, { type ErrorRequestHandler, type RequestHandler } from 'express';
import type { AppDeps, AppModule } from '../deps.js';
import { bodyErrorTranslator } from './middleware/body.js';
import { requestId } from './middleware/request-id.js';
import { problem, problemCatalogue, ProblemError, sendProblem, type ProblemSlug } from './problem.js';
import { createV1Router } from './v1/index.js';
import { engineProblem } from './engine-errors.js';

function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

const problemPage: RequestHandler = (req, res) => {
  const slug = String(req.params.slug);
  if (!Object.prototype.hasOwnProperty.call(problemCatalogue, slug)) {
    throw problem('not-found', `There is no problem type "${slug}".`);
  }
  const entry = problemCatalogue[slug as ProblemSlug];
  const format = req.accepts(['application/json', 'text/html']);
  if (format === 'text/html') {
    res
      .type('text/html')
      .send(
        `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(entry.title)} · Ebullio</title></head>` +
          `<body><h1>${escapeHtml(entry.title)}</h1><p>HTTP status ${entry.status}.</p><p>${escapeHtml(entry.description)}</p></body></html>`,
      );
    return;
  }
  res.json({ type: `/problems/${slug}`, ...entry });
};

const finalErrorHandler: ErrorRequestHandler = (err: unknown, _req, res, next) => {
  if (res.headersSent) return next(err);
  // Routes map engine errors to their request fields; this catches any that reach the app.
  const known = err instanceof ProblemError ? err : engineProblem(err);
  if (known) return sendProblem(res, known);
  console.error(`[error] request ${res.locals.requestId}:`, err);
  sendProblem(res, problem('internal', `Unexpected error; quote request id ${res.locals.requestId}.`));
};

/**
 * The HTTP app of `deps` with the routes outside /v1 given as `modules` (registered after /v1,
 * before the 404). `server/app.ts` composes the service's modules; this file imports none of them.
 */
export function createHttpApp(deps: AppDeps, modules: readonly AppModule[]): express.Express {
  const app = express();
  app.disable('x-powered-by');
  app.set('clock', deps.clock);
  app.set('query parser', 'simple');
  // No ETag on JSON answers: calculation results are POST responses that no client revalidates,
  // and hashing every body costs each request. (Console assets keep theirs: express.static sets
  // its own ETag and Last-Modified.)
  app.set('etag', false);
  app.use(requestId());

  app.get('/healthz', (_req, res) => {
    res.json({ status: 'ok' });
  });
  app.get('/readyz', async (_req, res) => {
    // A draining server still answers what reaches it, but should be sent nothing new.
    if (deps.lifecycle?.draining) {
      throw new ProblemError({
        status: 503,
        type: 'internal',
        title: 'Not ready',
        detail: 'The server is shutting down.',
      });
    }
    let pending: number;
    try {
      await deps.store.ping();
      pending = await deps.store.pendingMigrations();
    } catch (err) {
      throw new ProblemError({
        status: 503,
        type: 'internal',
        title: 'Not ready',
        detail: `The database is not reachable: ${(err as Error).message}`,
      });
    }
    if (pending > 0) {
      throw new ProblemError({
        status: 503,
        type: 'internal',
        title: 'Not ready',
        detail: `${pending} database migration(s) not applied.`,
      });
    }
    res.json({ status: 'ready', engineVersion: deps.engineVersion });
  });
  app.get('/problems/:slug', problemPage);

  // /v1 first: the calculation API is the hot path, and every layer registered before it is one
  // more path match per request. The modules' paths (/openapi.json, /docs, /console…) never
  // overlap /v1.
  app.use('/v1', createV1Router(deps));

  for (const module of modules) module.register(app, deps);

  app.use((req, _res, next) => {
    next(problem('not-found', `No route for ${req.method} ${req.path}.`));
  });
  app.use(bodyErrorTranslator());
  app.use(finalErrorHandler);
  return app;
}
