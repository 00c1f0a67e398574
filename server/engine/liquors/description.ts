/**
 * A liquor as plain data, for a calculation that runs in another thread: liquor models hold
 * functions and cannot cross a thread boundary, so the caller sends what the model was built
 * from (a built-in id, or a custom definition in SI) and the receiver rebuilds it here. The
 * rebuilt model is the same function of the same data, so its results are identical.
 */
import { createCustomLiquor, type CustomLiquorDefinition } from './custom.js';
import type { LiquorModel } from './model.js';
import { findBuiltInLiquor } from './registry.js';

/** A liquor as plain data for a worker thread (not the public {@link LiquorModel} description). */
export type LiquorReference =
  | { builtIn: string }
  | {
      /** The definition in SI, as `createCustomLiquor` takes it. */
      custom: CustomLiquorDefinition;
      /**
       * A key that names this definition for good (a stored liquor's account, id, version and
       * row): the receiver may keep the model under it. Absent for an inline definition.
       */
      key?: string;
    };

const COMPILED_MAX = 64;
const compiled = new Map<string, LiquorModel>();

/** The model a description names (refuses an unknown built-in id with an Error: a caller's bug). */
export function liquorFromDescription(description: LiquorReference): LiquorModel {
  if ('builtIn' in description) {
    const model = findBuiltInLiquor(description.builtIn);
    if (!model) throw new Error(`unknown built-in liquor "${description.builtIn}"`);
    return model;
  }
  const key = description.key;
  if (key === undefined) return createCustomLiquor(description.custom);
  let model = compiled.get(key);
  if (!model) {
    model = createCustomLiquor(description.custom);
    if (compiled.size >= COMPILED_MAX) compiled.delete(compiled.keys().next().value as string);
    compiled.set(key, model);
  }
  return model;
}
