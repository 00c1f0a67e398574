/**
 * Liquor models: the catalogue (built-in correlations and the account's stored liquors), one
 * model, and a liquor's boiling point and enthalpy. Liquors are resolved by the liquor service
 * (server/liquors); a batch case names its liquor in `liquor` or takes the batch's.
 */
import {
  BoilingPointRequestSchema,
  BoilingPointResponseSchema,
  EnthalpyRequestSchema,
  EnthalpyResponseSchema,
  LiquorIdParamsSchema,
  LiquorListQuerySchema,
  LiquorListSchema,
  LiquorRefSchema,
  LiquorSummarySchema,
  type BoilingPointResponse,
  type EnthalpyResponse,
  type LiquorRef,
  type LiquorSummary,
} from '../../../../shared/contracts/index.js';
import { operationCatalogue } from '../../../../shared/operations.js';
import { builtInLiquors, findBuiltInLiquor } from '../../../engine/liquors/registry.js';
import { saturationTemperature } from '../../../engine/steam/if97.js';
import type { EngineWarning } from '../../../engine/types.js';
import {
  buildCustomLiquor,
  listStoredLiquors,
  resolveLiquor,
  summarise,
  type ResolvedLiquor,
} from '../../../liquors/index.js';
import { calculate, warningsOut, type FieldMap } from '../../engine-errors.js';
import { display, provenance, r } from '../../output.js';
import { problem } from '../../problem.js';
import { validate } from '../../validate.js';
import { declareOperation, type OperationContext } from '../operation.js';
import { IF97_MODEL } from './steam.js';

/** The liquor of a batch case: its own `liquor`, else the batch's (paths relative to the case). */
function caseLiquor(
  c: Record<string, unknown>,
  shared: { liquor?: unknown },
  ctx: OperationContext,
): ResolvedLiquor {
  const ref = c.liquor ?? shared.liquor;
  if (ref === undefined) {
    throw problem('validation-failed', 'No liquor: give `liquor` for the batch or for the case.', {
      errors: [{ field: 'liquor', message: 'is required' }],
    });
  }
  const valid: LiquorRef = validate(LiquorRefSchema, ref, 'liquor');
  return resolveLiquor(valid, ctx.store.db, ctx.accountId, 'liquor');
}

/** The liquor the path names (404 'not-found' before the body is read). */
function pathLiquor(parts: { params: { liquorId: string } }, ctx: OperationContext): ResolvedLiquor {
  return resolveLiquor(parts.params.liquorId, ctx.store.db, ctx.accountId, 'liquorId');
}

const BOILING_POINT_FIELDS: FieldMap = {
  massFraction: 'massFraction',
  pressure: 'pressure',
  boilingPoint: { path: 'pressure', kind: 'temperature' },
};
const ENTHALPY_FIELDS: FieldMap = { massFraction: 'massFraction', temperature: 'temperature' };

export const liquorList = declareOperation({
  operation: operationCatalogue.liquorList,
  method: 'get',
  path: '/v1/liquors',
  openApiName: 'listLiquors',
  tag: 'Liquors',
  summary: 'Liquor models: built-in correlations and this account’s stored liquors, with their validity',
  request: { query: LiquorListQuerySchema },
  response: { description: 'The liquors', schema: LiquorListSchema },
  run: ({ query: { kind } }, ctx) => {
    const liquors: LiquorSummary[] = [];
    if (kind !== 'stored') for (const m of builtInLiquors.values()) liquors.push(summarise(m, 'built-in'));
    if (kind !== 'built-in') {
      for (const s of listStoredLiquors(ctx.store.db, ctx.accountId)) {
        liquors.push(summarise(buildCustomLiquor(s.definition, 'definition', s.id), 'stored', s.id));
      }
    }
    return { liquors };
  },
});

export const liquorGet = declareOperation({
  operation: operationCatalogue.liquorGet,
  method: 'get',
  path: '/v1/liquors/{liquorId}',
  openApiName: 'getLiquor',
  tag: 'Liquors',
  summary: 'One liquor model (built-in or stored)',
  request: { params: LiquorIdParamsSchema },
  response: { description: 'The liquor', schema: LiquorSummarySchema },
  problems: { 404: 'No such liquor' },
  load: pathLiquor,
  run: ({ params: { liquorId }, loaded }) =>
    summarise(loaded.model, findBuiltInLiquor(liquorId) ? 'built-in' : 'stored', liquorId),
});

export const liquorBoilingPoint = declareOperation({
  operation: operationCatalogue.liquorBoilingPoint,
  method: 'post',
  path: '/v1/liquors/{liquorId}/boiling-point',
  openApiName: 'postLiquorBoilingPoint',
  tag: 'Liquors',
  summary: 'Boiling point and boiling-point rise of a liquor at a mass fraction and pressure',
  request: {
    params: LiquorIdParamsSchema,
    body: BoilingPointRequestSchema,
    example: { summary: '30 % caustic in the last body', value: { massFraction: 0.3, pressure: '150 mbar' } },
  },
  response: { description: 'Boiling point', schema: BoilingPointResponseSchema },
  problems: { 404: 'No such liquor' },
  load: pathLiquor,
  run: ({ body: b, loaded: liquor }, ctx): BoilingPointResponse => {
    const warnings: EngineWarning[] = [...liquor.definitionWarnings];
    const out = calculate(BOILING_POINT_FIELDS, () => ({
      t: liquor.model.boilingPoint(b.massFraction, b.pressure, warnings),
      tw: saturationTemperature(b.pressure),
    }));
    return {
      boilingPoint: display(out.t, 'temperature'),
      waterBoilingPoint: display(out.tw, 'temperature'),
      boilingPointRise: r(out.t - out.tw),
      warnings: warningsOut(warnings, BOILING_POINT_FIELDS),
      cautions: liquor.model.cautions,
      provenance: provenance(ctx.engineVersion, [IF97_MODEL, ...liquor.models]),
    };
  },
  batch: { load: caseLiquor, consumes: ['liquor'] },
});

export const liquorEnthalpy = declareOperation({
  operation: operationCatalogue.liquorEnthalpy,
  method: 'post',
  path: '/v1/liquors/{liquorId}/enthalpy',
  openApiName: 'postLiquorEnthalpy',
  tag: 'Liquors',
  summary: 'Specific enthalpy (and heat capacity) of a liquor, steam-table datum',
  request: {
    params: LiquorIdParamsSchema,
    body: EnthalpyRequestSchema,
    example: { summary: 'Warm 30 % caustic', value: { massFraction: 0.3, temperature: '60 degC' } },
  },
  response: { description: 'Enthalpy', schema: EnthalpyResponseSchema },
  problems: { 404: 'No such liquor' },
  load: pathLiquor,
  run: ({ body: b, loaded: liquor }, ctx): EnthalpyResponse => {
    const warnings: EngineWarning[] = [...liquor.definitionWarnings];
    const out = calculate(ENTHALPY_FIELDS, () => ({
      h: liquor.model.enthalpy(b.massFraction, b.temperature, warnings),
      cp: liquor.model.heatCapacity?.(b.massFraction, b.temperature, warnings),
    }));
    return {
      enthalpy: display(out.h, 'specificEnthalpy'),
      ...(out.cp !== undefined ? { heatCapacity: display(out.cp, 'specificHeatCapacity') } : {}),
      warnings: warningsOut(warnings, ENTHALPY_FIELDS),
      cautions: liquor.model.cautions,
      provenance: provenance(ctx.engineVersion, [IF97_MODEL, ...liquor.models]),
    };
  },
  batch: { load: caseLiquor, consumes: ['liquor'] },
});
