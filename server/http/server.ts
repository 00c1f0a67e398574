/**
 * The HTTP server around the app: what Express cannot see because it happens before (or instead
 * of) a request reaching it. main.ts listens on `createHttpServer(app, config, lifecycle)`; tests
 * that need a listening server use the same function, so they see the same behaviour.
 *
 * - **Timeouts.** HEADERS_TIMEOUT_MS for the request line and headers, REQUEST_TIMEOUT_MS for the
 *   whole request, body included (Node's defaults, 60 s and 300 s, let a trickling client hold a
 *   connection for minutes), KEEP_ALIVE_TIMEOUT_MS for an idle keep-alive connection. A request
 *   that times out gets a 408 problem and the connection is closed. Node reports the timeout as a
 *   'clientError'; the 408 can be written only while no byte of a response has left on that
 *   connection (otherwise the client would read it as part of the earlier response), so when a
 *   response has started the connection is closed without a word. A /v1 request timed out in
 *   its body is metered as 408, never billed.
 * - **Expect: 100-continue.** Node answers `100 Continue` by itself unless the server handles
 *   'checkContinue'. Here a declared Content-Length above what the request's media type may carry
 *   (the body parser's BODY_LIMIT, or the multipart ceiling of upload.ts) is refused at once with
 *   a 413 problem and `Connection: close`, so the client never sends the body; otherwise the
 *   server says `100 Continue` and hands the request to the app. The refusal comes before
 *   authentication, so it is not metered (nothing was computed; a 2xx is always metered).
 * - **Draining.** From `startDraining(server)` on (main.ts on SIGTERM), every response that has
 *   not started carries `Connection: close`, those of requests already in flight included, so
 *   keep-alive clients stop reusing their connections; /readyz answers 503 (app.ts).
 */
import http from 'node:http';
import type { Socket } from 'node:net';
import crypto from 'node:crypto';
import { serverSettings, type Config } from '../config.js';
import type { Lifecycle } from '../deps.js';
import { timedOutRequests } from './middleware/body.js';
import { REQUEST_ID_PATTERN } from './middleware/request-id.js';
import { problemCatalogue, problemTypeUri, type ProblemBody } from './problem.js';
import { MULTIPART_BODY_CEILING } from './upload.js';

/** The largest body a request with this Content-Type can have accepted, bytes. */
export function bodyCeiling(contentType: string | undefined, config: Config): number {
  const multipart = contentType !== undefined && /^\s*multipart\/form-data\s*(;|$)/i.test(contentType);
  return multipart ? Math.max(MULTIPART_BODY_CEILING, config.bodyLimitBytes) : config.bodyLimitBytes;
}

function problemText(
  slug: 'request-timeout' | 'payload-too-large' | 'expectation-failed',
  detail: string,
  instance: string,
  requestId: string,
): string {
  const entry = problemCatalogue[slug];
  const body: ProblemBody = {
    type: problemTypeUri(slug),
    title: entry.title,
    status: entry.status,
    detail,
    instance,
    requestId,
  };
  return JSON.stringify(body);
}

function requestIdOf(req: http.IncomingMessage): string {
  const offered = req.headers['x-request-id'];
  return typeof offered === 'string' && REQUEST_ID_PATTERN.test(offered) ? offered : crypto.randomUUID();
}

function pathOf(url: string | undefined): string {
  const u = url ?? '/';
  const query = u.indexOf('?');
  return query === -1 ? u : u.slice(0, query);
}

// Node's own answers to the other client errors (node/lib/_http_server.js), which a 'clientError'
// listener replaces: a malformed request gets no problem body, as it may not even be HTTP.
const RAW_ANSWERS: Record<string, string> = {
  HPE_HEADER_OVERFLOW: 'HTTP/1.1 431 Request Header Fields Too Large\r\nConnection: close\r\n\r\n',
  HPE_CHUNK_EXTENSIONS_OVERFLOW: 'HTTP/1.1 413 Payload Too Large\r\nConnection: close\r\n\r\n',
};
const BAD_REQUEST = 'HTTP/1.1 400 Bad Request\r\nConnection: close\r\n\r\n';

interface HttpSocket extends Socket {
  /** The response in progress on this connection (Node's own field). */
  _httpMessage?: http.ServerResponse | null;
}

function onClientError(err: NodeJS.ErrnoException, socket: HttpSocket): void {
  const response = socket._httpMessage;
  // Only while nothing of a response has left: a status line in the middle of another response
  // would corrupt what the client reads.
  const canAnswer = socket.writable && (!response || !response.headersSent);
  if (canAnswer) {
    if (err.code === 'ERR_HTTP_REQUEST_TIMEOUT') {
      // The app may have the request already (waiting for its body): name it as the app does.
      const req = response?.req as (http.IncomingMessage & { originalUrl?: string }) | undefined;
      if (req) timedOutRequests.add(req);
      const assigned = response?.getHeader('X-Request-Id');
      const body = problemText(
        'request-timeout',
        'The request (headers and body) did not arrive in time; the connection is closed.',
        pathOf(req?.originalUrl ?? req?.url),
        typeof assigned === 'string' ? assigned : req ? requestIdOf(req) : crypto.randomUUID(),
      );
      socket.write(
        'HTTP/1.1 408 Request Timeout\r\nContent-Type: application/problem+json\r\n' +
          `Content-Length: ${Buffer.byteLength(body)}\r\nConnection: close\r\n\r\n${body}`,
      );
    } else if (err.code !== 'ECONNRESET') {
      socket.write(RAW_ANSWERS[err.code ?? ''] ?? BAD_REQUEST);
    }
  }
  socket.destroy();
}

/** The 413 for a body announced too large under Expect: 100-continue; else 100 Continue. */
function checkContinue(
  config: Config,
  handle: http.RequestListener,
): (req: http.IncomingMessage, res: http.ServerResponse) => void {
  return (req, res) => {
    const declared = req.headers['content-length'];
    const limit = bodyCeiling(req.headers['content-type'], config);
    if (declared !== undefined && Number(declared) > limit) {
      const requestId = requestIdOf(req);
      const body = problemText(
        'payload-too-large',
        `The declared body of ${declared} bytes exceeds the limit of ${limit} bytes; do not send it.`,
        pathOf(req.url),
        requestId,
      );
      res.writeHead(413, {
        'Content-Type': 'application/problem+json',
        'Content-Length': Buffer.byteLength(body),
        'X-Request-Id': requestId,
        Connection: 'close',
      });
      res.end(body);
      return;
    }
    res.writeContinue();
    handle(req, res);
  };
}

/** Any other expectation: a 417 problem instead of Node's bodiless 417 (RFC 9110 §10.1.1). */
function checkExpectation(req: http.IncomingMessage, res: http.ServerResponse): void {
  const requestId = requestIdOf(req);
  const body = problemText(
    'expectation-failed',
    `Expect: ${String(req.headers.expect).slice(0, 80)} cannot be met; send the request without it or with Expect: 100-continue.`,
    pathOf(req.url),
    requestId,
  );
  res.writeHead(417, {
    'Content-Type': 'application/problem+json',
    'Content-Length': Buffer.byteLength(body),
    'X-Request-Id': requestId,
    Connection: 'close',
  });
  res.end(body);
}

/** What startDraining needs of a server made here. */
interface ServerState {
  lifecycle: Lifecycle;
  /** Responses whose requests have arrived and which have not closed yet. */
  inFlight: Set<http.ServerResponse>;
}
const states = new WeakMap<http.Server, ServerState>();

/**
 * Marks the server as draining: later responses and those of the requests in flight close their
 * connection once sent. The caller closes the listener and, later, the idle connections.
 */
export function startDraining(server: http.Server): void {
  const state = states.get(server);
  if (!state) throw new Error('startDraining: not a server made by createHttpServer');
  state.lifecycle.draining = true;
  for (const res of state.inFlight) if (!res.headersSent) res.setHeader('Connection', 'close');
}

export function createHttpServer(
  app: http.RequestListener,
  config: Config,
  lifecycle: Lifecycle = { draining: false },
): http.Server {
  const settings = serverSettings(config);
  const inFlight = new Set<http.ServerResponse>();
  // One shared listener, not a closure per request.
  function settled(this: http.ServerResponse): void {
    inFlight.delete(this);
  }
  const handle: http.RequestListener = (req, res) => {
    if (lifecycle.draining) res.setHeader('Connection', 'close');
    else {
      inFlight.add(res);
      res.on('close', settled);
    }
    app(req, res);
  };
  const server = http.createServer(
    {
      headersTimeout: settings.headersTimeoutMs,
      requestTimeout: settings.requestTimeoutMs,
      keepAliveTimeout: settings.keepAliveTimeoutMs,
      // Node looks for expired requests on this period (30 s by default, which would let a
      // 10 s headers timeout run to 40 s): a quarter of the shorter timeout, at most 1 s.
      connectionsCheckingInterval: Math.max(
        25,
        Math.min(1000, Math.floor(Math.min(settings.headersTimeoutMs, settings.requestTimeoutMs) / 4)),
      ),
    },
    handle,
  );
  server.on('checkContinue', checkContinue(config, handle));
  server.on('checkExpectation', checkExpectation);
  server.on('clientError', onClientError);
  states.set(server, { lifecycle, inFlight });
  return server;
}
