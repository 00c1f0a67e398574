/**
 * The liquor service: resolving built-in, inline and stored liquors (with the compiled-stored
 * cache), the stored-liquor repository, CSV reading for Dühring tables and public summaries.
 * Used by the /v1 operations and the console API alike; it knows nothing of routes.
 */
export { buildCustomLiquor, toEngineDefinition } from './definition.js';
export { coefficientsField, duhringFromCsv, inCsvTerms, type DuhringUpload } from './csv.js';
export {
  deleteStoredLiquor,
  findStoredLiquor,
  insertStoredLiquor,
  insertStoredLiquorVersion,
  listStoredLiquors,
  listStoredLiquorsWithAccounts,
  storedLiquorExists,
  storedLiquorView,
  type StoredLiquorRecord,
} from './repository.js';
export { resolveLiquor, type ResolvedLiquor } from './resolve.js';
export { summarise } from './summary.js';
