/**
 * The one place that turns a request's `liquor` (a built-in id, an id stored by the account, or
 * an inline definition in display units) into an engine LiquorModel, with a bounded cache of
 * compiled stored liquors. The /v1 operations and the console use it alike.
 */
import { randomUUID } from 'node:crypto';
import type { LiquorRef } from '../../shared/contracts/index.js';
import type { Store } from '../db/store.js';
import type { LiquorReference } from '../engine/liquors/description.js';
import type { LiquorModel } from '../engine/liquors/model.js';
import { findBuiltInLiquor } from '../engine/liquors/registry.js';
import type { EngineWarning } from '../engine/types.js';
import { problem } from '../http/problem.js';
import type { ModelRef } from '../http/output.js';
import { buildCustomLiquor, toEngineDefinition } from './definition.js';
import { findStoredLiquor } from './repository.js';

export interface ResolvedLiquor {
  model: LiquorModel;
  /** For provenance. */
  models: ModelRef[];
  /** Warnings about the definition itself (custom liquors). */
  definitionWarnings: EngineWarning[];
  /** The model as plain data, for a calculation in a worker thread, which rebuilds it. */
  description: LiquorReference;
}

function modelRefs(model: LiquorModel): ModelRef[] {
  return [{ id: model.id, source: model.sources.map((s) => s.reference).join('; ') }];
}

/**
 * Compiled stored liquors of each store by account, id and version, oldest first (a Map keeps
 * insertion order), bounded. An update stores a new version, so its key is new and it is compiled at once.
 */
const compiledByStore = new WeakMap<Store, Map<string, ResolvedLiquor>>();
const COMPILED_STORED_MAX = 256;
const storeTokens = new WeakMap<Store, string>();

/**
 * The liquor a request names: a built-in id, an id stored by this account, or an inline
 * definition. 404 'not-found' for an unknown id (the field is named in `errors`).
 */
export async function resolveLiquor(
  ref: LiquorRef,
  store: Store,
  accountId: number,
  field: string,
): Promise<ResolvedLiquor> {
  if (typeof ref === 'string') {
    const builtIn = findBuiltInLiquor(ref);
    if (builtIn) {
      return {
        model: builtIn,
        models: modelRefs(builtIn),
        definitionWarnings: [],
        description: { builtIn: builtIn.id },
      };
    }
    const stored = await findStoredLiquor(store, accountId, ref);
    if (!stored) {
      throw problem(
        'not-found',
        `There is no built-in liquor and no liquor stored by this account with the id "${ref}".`,
        {
          errors: [{ field, message: 'unknown liquor id', value: ref }],
        },
      );
    }
    // A stored version is immutable (an update adds a version, never edits one) and the lookup
    // above finds the latest version first, so an update is served at once. The row id is part
    // of the key too: a liquor deleted and stored again starts at version 1 with a new row.
    const key = `${accountId}/${ref}/${stored.version}/${stored.rowId}`;
    let compiledStored = compiledByStore.get(store);
    if (!compiledStored) {
      compiledByStore.set(store, (compiledStored = new Map()));
      storeTokens.set(store, randomUUID());
    }
    const cached = compiledStored.get(key);
    if (cached) return cached;
    const model = buildCustomLiquor(stored.definition, field, ref);
    // Provenance names the stored liquor's version, so a logged result traces to its definition.
    const models = modelRefs(model).map((m) => ({ ...m, version: stored.version }));
    const resolved = {
      model,
      models,
      definitionWarnings: model.definitionWarnings,
      // A worker keeps the model under this key: the store's token keeps two databases in one
      // process (tests) from sharing a key.
      description: {
        custom: toEngineDefinition(stored.definition, ref),
        key: `stored:${storeTokens.get(store)}/${key}`,
      },
    };
    if (compiledStored.size >= COMPILED_STORED_MAX) {
      compiledStored.delete(compiledStored.keys().next().value as string);
    }
    compiledStored.set(key, resolved);
    return resolved;
  }
  const model = buildCustomLiquor(ref, field);
  return {
    model,
    models: modelRefs(model),
    definitionWarnings: model.definitionWarnings,
    description: { custom: toEngineDefinition(ref) },
  };
}
