/**
 * Liquor routes: GET /v1/liquors (catalogue), GET /v1/liquors/{liquorId},
 * POST /v1/liquors/{liquorId}/boiling-point and /enthalpy. Liquors are resolved by the
 * liquor service (server/liquors).
 */
import {
  BoilingPointRequestSchema,
  EnthalpyRequestSchema,
  LiquorIdParamsSchema,
  LiquorListQuerySchema,
  specs,
  type BoilingPointResponse,
  type EnthalpyResponse,
  type LiquorSummary,
} from '../../../shared/contracts/index.js';
import { builtInLiquors, findBuiltInLiquor } from '../../engine/liquors/registry.js';
import { saturationTemperature } from '../../engine/steam/if97.js';
import type { EngineWarning } from '../../engine/types.js';
import {
  buildCustomLiquor,
  listStoredLiquors,
  resolveLiquor,
  summarise,
  type ResolvedLiquor,
} from '../../liquors/index.js';
import { requireOperation } from '../middleware/operation.js';
import {
  calculate,
  display,
  provenance,
  r,
  readQuantity,
  sendCalculation,
  validate,
  warningsOut,
  type FieldMap,
} from '../validation.js';
import { IF97_MODEL } from './steam.js';
import type { V1RouteModule } from './module.js';

/** The boiling point calculation for one liquor (shared with /v1/batch). */
export function runBoilingPoint(
  liquor: ResolvedLiquor,
  body: unknown,
  engineVersion: string,
  prefix = '',
): BoilingPointResponse {
  const b = validate(BoilingPointRequestSchema, body, prefix);
  const map: FieldMap = {
    massFraction: `${prefix}massFraction`,
    pressure: `${prefix}pressure`,
    boilingPoint: { path: `${prefix}pressure`, kind: 'temperature' },
  };
  const warnings: EngineWarning[] = [...liquor.definitionWarnings];
  const out = calculate(map, () => {
    const x = readQuantity(b.massFraction, specs.massFraction, `${prefix}massFraction`);
    const p = readQuantity(b.pressure, specs.pressure, `${prefix}pressure`);
    const t = liquor.model.boilingPoint(x, p, warnings);
    const tw = saturationTemperature(p);
    return { t, tw };
  });
  return {
    boilingPoint: display(out.t, 'temperature'),
    waterBoilingPoint: display(out.tw, 'temperature'),
    boilingPointRise: r(out.t - out.tw),
    warnings: warningsOut(warnings, map),
    cautions: liquor.model.cautions,
    provenance: provenance(engineVersion, [IF97_MODEL, ...liquor.models]),
  };
}

/** The enthalpy calculation for one liquor (shared with /v1/batch). */
export function runEnthalpy(
  liquor: ResolvedLiquor,
  body: unknown,
  engineVersion: string,
  prefix = '',
): EnthalpyResponse {
  const b = validate(EnthalpyRequestSchema, body, prefix);
  const map: FieldMap = { massFraction: `${prefix}massFraction`, temperature: `${prefix}temperature` };
  const warnings: EngineWarning[] = [...liquor.definitionWarnings];
  const out = calculate(map, () => {
    const x = readQuantity(b.massFraction, specs.massFraction, `${prefix}massFraction`);
    const t = readQuantity(b.temperature, specs.temperature, `${prefix}temperature`);
    const h = liquor.model.enthalpy(x, t, warnings);
    const cp = liquor.model.heatCapacity?.(x, t, warnings);
    return { h, cp };
  });
  return {
    enthalpy: display(out.h, 'specificEnthalpy'),
    ...(out.cp !== undefined ? { heatCapacity: display(out.cp, 'specificHeatCapacity') } : {}),
    warnings: warningsOut(warnings, map),
    cautions: liquor.model.cautions,
    provenance: provenance(engineVersion, [IF97_MODEL, ...liquor.models]),
  };
}

export const liquorRoutes: V1RouteModule = {
  register(router, deps) {
    router.get('/liquors', requireOperation('liquors.list'), (req, res) => {
      const { kind } = validate(LiquorListQuerySchema, req.query);
      const liquors: LiquorSummary[] = [];
      if (kind !== 'stored') for (const m of builtInLiquors.values()) liquors.push(summarise(m, 'built-in'));
      if (kind !== 'built-in') {
        for (const s of listStoredLiquors(deps.db, res.locals.auth!.accountId)) {
          liquors.push(summarise(buildCustomLiquor(s.definition, 'definition', s.id), 'stored', s.id));
        }
      }
      sendCalculation(res, { liquors });
    });

    router.get('/liquors/:liquorId', requireOperation('liquors.get'), (req, res) => {
      const { liquorId } = validate(LiquorIdParamsSchema, req.params);
      const resolved = resolveLiquor(liquorId, deps.db, res.locals.auth!.accountId, 'liquorId');
      sendCalculation(
        res,
        summarise(resolved.model, findBuiltInLiquor(liquorId) ? 'built-in' : 'stored', liquorId),
      );
    });

    router.post('/liquors/:liquorId/boiling-point', requireOperation('liquors.boiling-point'), (req, res) => {
      const { liquorId } = validate(LiquorIdParamsSchema, req.params);
      const liquor = resolveLiquor(liquorId, deps.db, res.locals.auth!.accountId, 'liquorId');
      sendCalculation(res, runBoilingPoint(liquor, req.body, deps.engineVersion));
    });

    router.post('/liquors/:liquorId/enthalpy', requireOperation('liquors.enthalpy'), (req, res) => {
      const { liquorId } = validate(LiquorIdParamsSchema, req.params);
      const liquor = resolveLiquor(liquorId, deps.db, res.locals.auth!.accountId, 'liquorId');
      sendCalculation(res, runEnthalpy(liquor, req.body, deps.engineVersion));
    });
  },
};
