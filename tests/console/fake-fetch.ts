// A scripted fetch for the console tests: each call is recorded and answered by the first
// matching route (method + path without the query string).
export interface Recorded {
  method: string;
  url: string;
  path: string;
  headers: Record<string, string>;
  body: unknown;
}

export type Responder = (call: Recorded, n: number) => Response | Promise<Response>;

export function json(status: number, body: unknown, headers: Record<string, string> = {}): Response {
  return new Response(JSON.stringify(body), {
    status,
    headers: { 'Content-Type': status >= 400 ? 'application/problem+json' : 'application/json', ...headers },
  });
}

export function fakeFetch(routes: Record<string, Responder>) {
  const calls: Recorded[] = [];
  const counts = new Map<string, number>();
  const fetchImpl = (async (input: RequestInfo | URL, init: RequestInit = {}) => {
    const url = String(input);
    const path = url.split('?')[0] ?? url;
    const method = (init.method ?? 'GET').toUpperCase();
    const headers = Object.fromEntries(
      Object.entries((init.headers ?? {}) as Record<string, string>).map(([k, v]) => [k.toLowerCase(), v]),
    );
    const body = typeof init.body === 'string' ? (JSON.parse(init.body) as unknown) : init.body;
    const call = { method, url, path, headers, body };
    calls.push(call);
    const key = `${method} ${path}`;
    const responder = routes[key];
    if (!responder) return json(404, { type: '/problems/not-found', title: 'Not found', status: 404 });
    const n = (counts.get(key) ?? 0) + 1;
    counts.set(key, n);
    return responder(call, n);
  }) as typeof fetch;
  return { fetch: fetchImpl, calls };
}
