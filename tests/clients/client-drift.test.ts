// The committed client types must be what openapi-typescript makes of the committed OpenAPI
// document today; `npm run openapi` (or `npm run client:generate`) rewrites them.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { clientSchemaPath, generateClientSchema } from '../../scripts/generate-client.js';

describe('openapi/client/schema.d.ts', () => {
  it('matches what openapi-typescript generates from openapi/openapi.json', async () => {
    const committed = readFileSync(clientSchemaPath, 'utf8');
    const generated = await generateClientSchema();
    expect(generated.length).toBeGreaterThan(1000);
    expect(committed, 'run `npm run client:generate` and commit openapi/client/schema.d.ts').toBe(generated);
  });

  it('changes when the document changes, so the check can fail', async () => {
    const doc = JSON.parse(readFileSync(new URL('../../openapi/openapi.json', import.meta.url), 'utf8')) as {
      components: { schemas: Record<string, { properties?: Record<string, unknown> }> };
    };
    doc.components.schemas.Problem!.properties!.inventedField = { type: 'string' };
    const altered = await generateClientSchema(JSON.stringify(doc));
    expect(altered).toContain('inventedField?: string;');
    expect(altered).not.toBe(readFileSync(clientSchemaPath, 'utf8'));
  });
});
