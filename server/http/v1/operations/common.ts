/**
 * What several /v1 declarations share: loading the body's liquor (built-in id, stored id or an
 * inline definition, 404 for an unknown stored id) and formatting a liquor stream in display units.
 */
import type { StreamState } from '../../../engine/evaporators/single-effect.js';
import { resolveLiquor } from '../../../liquors/index.js';
import { display, r } from '../../output.js';
import type { OperationContext } from '../operation.js';

/** The `load` of a declaration whose body names its liquor in `liquor`. */
export function bodyLiquor(
  parts: { body: { liquor: Parameters<typeof resolveLiquor>[0] } },
  ctx: OperationContext,
) {
  return resolveLiquor(parts.body.liquor, ctx.store.db, ctx.accountId, 'liquor');
}

/** A feed or product stream in display units. */
export function streamOut(s: StreamState) {
  return {
    massFlow: r(s.massFlow),
    massFraction: r(s.massFraction),
    temperature: display(s.temperature, 'temperature'),
    enthalpy: display(s.enthalpy, 'specificEnthalpy'),
  };
}
