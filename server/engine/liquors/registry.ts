/**
 * The built-in liquor models, by id. Custom liquors (Dühring tables, polynomials) are built
 * from data by ./custom.ts and are not registered here: they belong to a request or an account.
 */
import type { LiquorModel } from './model.js';
import { sodiumHydroxide } from './sodium-hydroxide.js';
import { sucrose } from './sucrose.js';
import { seawater } from './seawater.js';
import { kraftBlackLiquor } from './kraft-black-liquor.js';

export const builtInLiquors: ReadonlyMap<string, LiquorModel> = new Map(
  [sodiumHydroxide, sucrose, seawater, kraftBlackLiquor].map((m) => [m.id, m]),
);

export function findBuiltInLiquor(id: string): LiquorModel | undefined {
  return builtInLiquors.get(id);
}
