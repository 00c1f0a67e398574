// The committed openapi/console.json must be what scripts/generate-console-openapi.ts writes from
// the routes declared with consoleRoute (regenerate: `npx tsx scripts/generate-console-openapi.ts`).
// Structure checked against OpenAPI 3.1.0 §4.8.27 (Security Scheme Object: type apiKey, in cookie).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { consoleOpenApiPath, serialiseConsoleOpenApi } from '../../scripts/generate-console-openapi.js';

interface Op {
  security?: unknown[];
  parameters?: { name: string; in: string; required?: boolean }[];
  responses: Record<string, { content?: Record<string, unknown> }>;
}

describe('openapi/console.json', () => {
  const generated = serialiseConsoleOpenApi();

  it('matches the document generated from the console route table', () => {
    expect(readFileSync(consoleOpenApiPath, 'utf8')).toBe(generated);
  });

  it('documents the cookie security schemes and the CSRF header of every state-changing call', () => {
    const doc = JSON.parse(generated) as {
      openapi: string;
      paths: Record<string, Record<string, Op>>;
      components: { securitySchemes: Record<string, { type: string; in: string; name: string }> };
    };
    expect(doc.openapi).toBe('3.1.0');
    expect(doc.components.securitySchemes.consoleSession).toMatchObject({
      type: 'apiKey',
      in: 'cookie',
      name: 'ebullio_access',
    });
    expect(doc.components.securitySchemes.consoleRefresh).toMatchObject({
      type: 'apiKey',
      in: 'cookie',
      name: 'ebullio_refresh',
    });
    let mutating = 0;
    for (const [path, item] of Object.entries(doc.paths)) {
      expect(path.startsWith('/console-api/')).toBe(true);
      for (const [method, op] of Object.entries(item)) {
        expect(op.responses['422']?.content?.['application/problem+json'], `${method} ${path}`).toBeDefined();
        if (method !== 'get') {
          mutating++;
          const csrf = op.parameters?.find((p) => p.name === 'X-CSRF-Token');
          expect(csrf, `${method} ${path}`).toMatchObject({ in: 'header', required: true });
        }
      }
    }
    expect(mutating).toBeGreaterThan(0);
  });
});
