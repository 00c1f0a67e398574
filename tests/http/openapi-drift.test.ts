// The committed openapi/openapi.json must be what scripts/generate-openapi.ts writes from the
// current contracts (regenerate with `npx tsx scripts/generate-openapi.ts`).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { openApiPath, serialiseOpenApi } from '../../scripts/generate-openapi.js';

describe('openapi/openapi.json', () => {
  it('matches the document generated from the zod contracts', () => {
    expect(readFileSync(openApiPath, 'utf8')).toBe(serialiseOpenApi());
  });

  it('documents every route with the bearer scheme and problem details', () => {
    const doc = JSON.parse(serialiseOpenApi()) as {
      openapi: string;
      paths: Record<
        string,
        Record<
          string,
          {
            security?: unknown;
            responses: Record<
              string,
              { content?: Record<string, unknown>; headers?: Record<string, unknown> }
            >;
          }
        >
      >;
      components: { securitySchemes: Record<string, { scheme: string }> };
    };
    expect(doc.openapi).toBe('3.1.0'); // OpenAPI 3.1 (brief)
    expect(doc.components.securitySchemes.bearerAuth?.scheme).toBe('bearer');
    for (const [path, item] of Object.entries(doc.paths)) {
      for (const [method, op] of Object.entries(item)) {
        expect(op.security, `${method} ${path}`).toBeDefined();
        expect(op.responses['422']?.content?.['application/problem+json'], `${method} ${path}`).toBeDefined();
        // IETF draft-ietf-httpapi-ratelimit-headers-07 field names.
        expect(Object.keys(op.responses['422']?.headers ?? {})).toEqual(['RateLimit', 'RateLimit-Policy']);
      }
    }
  });
});

describe('openApiRouter', () => {
  it('serves /openapi.json and the Swagger UI page at /docs without a CDN', async () => {
    const express = (await import('express')).default;
    const request = (await import('supertest')).default;
    const { openApiRouter } = await import('../../server/http/openapi.js');
    const app = express().use(openApiRouter());
    const doc = await request(app).get('/openapi.json');
    expect(doc.status).toBe(200);
    expect(doc.body.openapi).toBe('3.1.0');
    const page = await request(app).get('/docs/');
    expect(page.status).toBe(200);
    expect(page.text).not.toMatch(/https?:\/\/(cdn|unpkg)/);
  });

  it('links the API reference page back to the console, with nothing loaded from elsewhere', async () => {
    const express = (await import('express')).default;
    const request = (await import('supertest')).default;
    const { openApiRouter } = await import('../../server/http/openapi.js');
    const app = express().use(openApiRouter());
    const page = await request(app).get('/docs/');
    const src = /<script src=['"](\/docs-assets\/[^'"]+\.js)['"]>/.exec(page.text)?.[1];
    expect(src).toBeDefined();
    const script = await request(app).get(src!);
    expect(script.status).toBe(200);
    expect(script.headers['content-type']).toMatch(/javascript/);
    expect(script.text).toContain("back.href = '/console/'");
    expect(script.text).toContain('Back to the Ebullio console');
    // Only relative script and style addresses (the Swagger UI assets served beside the page).
    expect(page.text).not.toMatch(/(src|href)=['"](https?:)?\/\//);
  });
});
