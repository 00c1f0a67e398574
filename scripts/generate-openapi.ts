/**
 * Writes the v1 OpenAPI document generated from the zod contracts to openapi/openapi.json.
 * Run: `npx tsx scripts/generate-openapi.ts` (tests/http/openapi-drift.test.ts fails when the
 * committed file differs from what this script would write).
 */
import { writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { buildOpenApiDocument } from '../server/http/openapi.js';

export function serialiseOpenApi(): string {
  return JSON.stringify(buildOpenApiDocument(), null, 2) + '\n';
}

export const openApiPath = fileURLToPath(new URL('../openapi/openapi.json', import.meta.url));

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  writeFileSync(openApiPath, serialiseOpenApi());
  console.log(`wrote ${openApiPath}`);
}
