/**
 * The TypeScript client of Ebullio's v1 API: openapi-fetch over the types that openapi-typescript
 * generates from openapi/openapi.json (`schema.d.ts`, written by `npm run client:generate`; do not
 * edit it by hand). Every path, body and answer is typed from the document, so a request the API
 * would refuse for its shape does not compile.
 *
 * ```ts
 * const ebullio = createEbullioClient({ baseUrl: 'http://localhost:8080', apiKey: process.env.EBULLIO_KEY! });
 * const { data, error } = await ebullio.POST('/v1/evaporators/single-effect', { body: { … } });
 * if (error) console.error(error.detail, error.errors); // an RFC 9457 problem
 * ```
 */
import createClient, { type Client, type ClientOptions } from 'openapi-fetch';
import type { components, operations, paths } from './schema.js';

export type { components, operations, paths };

/** A schema of the API by its component name, e.g. `Schema<'SingleEffectResponse'>`. */
export type Schema<Name extends keyof components['schemas']> = components['schemas'][Name];

/** An RFC 9457 problem as the API sends it (`application/problem+json`). */
export type Problem = Schema<'Problem'> & { requestId?: string };

/**
 * The JSON media types (`application/json`, `application/problem+json`): answers are typed as JSON.
 * For CSV, send `Accept: text/csv` with `parseAs: 'text'` and read `response` yourself.
 */
export type JsonMedia = `${string}/${string}json`;

export type EbullioClient = Client<paths, JsonMedia>;

export interface EbullioClientOptions {
  /** Where the API answers, without `/v1`, e.g. `https://ebullio.example` or `http://localhost:8080`. */
  baseUrl: string;
  /** An API key issued in the console (`ebk1.<public id>.<secret>`); sent as `Authorization: Bearer <key>`. */
  apiKey: string;
  /** Another fetch (a proxy agent, a test double); by default the global one. */
  fetch?: ClientOptions['fetch'];
  /** Headers sent with every request besides the key (e.g. a `User-Agent` naming your tool). */
  headers?: Record<string, string>;
}

/** A client for every /v1 operation, with the key on each request. */
export function createEbullioClient(options: EbullioClientOptions): EbullioClient {
  // A key with whitespace or control characters would make a broken or split header: refuse it here.
  if (!/^[\x21-\x7e]+$/.test(options.apiKey)) {
    throw new TypeError('apiKey must be the key as issued: printable ASCII without spaces');
  }
  const base = new URL(options.baseUrl);
  if (base.protocol !== 'https:' && base.protocol !== 'http:') {
    throw new TypeError('baseUrl must be an http or https URL');
  }
  return createClient<paths, JsonMedia>({
    baseUrl: base.href.replace(/\/+$/, ''),
    headers: { ...options.headers, Authorization: `Bearer ${options.apiKey}` },
    ...(options.fetch ? { fetch: options.fetch } : {}),
  });
}

/** Whether a value has the members every problem of this API has (type, title, status). */
export function isProblem(value: unknown): value is Problem {
  if (typeof value !== 'object' || value === null) return false;
  const v = value as Record<string, unknown>;
  return typeof v.type === 'string' && typeof v.title === 'string' && typeof v.status === 'number';
}
