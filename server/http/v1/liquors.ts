/**
 * Liquor routes: GET /v1/liquors (catalogue), GET /v1/liquors/{liquorId},
 * POST /v1/liquors/{liquorId}/boiling-point and /enthalpy. Also the one place that turns a
 * request's `liquor` (a built-in id, an id stored by the account, or an inline definition in
 * display units) into an engine LiquorModel; the evaporator and batch routes use it.
 */
import {
  BoilingPointRequestSchema,
  EnthalpyRequestSchema,
  LiquorIdParamsSchema,
  LiquorListQuerySchema,
  specs,
  type BoilingPointResponse,
  type CustomLiquorDefinition,
  type EnthalpyResponse,
  type LiquorRef,
  type LiquorSummary,
} from '../../../shared/contracts/index.js';
import type { Db } from '../../db/client.js';
import {
  createCustomLiquor,
  type CustomLiquorDefinition as EngineDefinition,
} from '../../engine/liquors/custom.js';
import { describeLiquor, type LiquorModel, type ValidityBox } from '../../engine/liquors/model.js';
import { builtInLiquors, findBuiltInLiquor } from '../../engine/liquors/registry.js';
import { saturationTemperature } from '../../engine/steam/if97.js';
import { KELVIN_OFFSET, type EngineWarning } from '../../engine/types.js';
import { requireOperation } from '../middleware/operation.js';
import { problem } from '../problem.js';
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
  type ModelRef,
} from '../validation.js';
import { IF97_MODEL } from './steam.js';
import { findStoredLiquor, listStoredLiquors } from './stored-liquors.js';
import type { V1RouteModule } from './module.js';

const KJ = 1000;

/** Inline/stored definition in display units (°C, kJ/kg, kJ/(kg·K)) → the engine's SI definition. */
export function toEngineDefinition(def: CustomLiquorDefinition, id?: string): EngineDefinition {
  const common = {
    name: def.name,
    ...(id !== undefined ? { id: `custom:${id}` } : {}),
    ...(def.compositionVariable !== undefined ? { compositionVariable: def.compositionVariable } : {}),
    ...(def.heatCapacity
      ? { heatCapacity: { polynomial: def.heatCapacity.polynomial.map((c) => c * KJ) } }
      : {}),
    ...(def.enthalpy
      ? {
          enthalpy: {
            table: def.enthalpy.table.map((row) => ({
              massFraction: row.massFraction,
              points: row.points.map((p) => ({
                temperature: p.temperature + KELVIN_OFFSET,
                enthalpy: p.enthalpy * KJ,
              })),
            })),
          },
        }
      : {}),
  };
  if (def.boilingPoint) {
    return {
      ...common,
      boilingPoint: {
        duhring: def.boilingPoint.duhring.map((line) => ({
          massFraction: line.massFraction,
          points: line.points.map((p) => ({
            waterBoilingPoint: p.waterBoilingPoint + KELVIN_OFFSET,
            solutionBoilingPoint: p.solutionBoilingPoint + KELVIN_OFFSET,
          })),
        })),
      },
    };
  }
  return {
    ...common,
    boilingPointRise: { polynomial: def.boilingPointRise?.polynomial ?? [] },
    ...(def.validity
      ? {
          validity: {
            massFraction: def.validity.massFraction,
            ...(def.validity.temperature
              ? {
                  temperature: {
                    min: def.validity.temperature.min + KELVIN_OFFSET,
                    max: def.validity.temperature.max + KELVIN_OFFSET,
                  },
                }
              : {}),
          },
        }
      : {}),
  };
}

/**
 * Field map for errors raised while building a custom liquor: the engine names paths inside the
 * definition ("boilingPoint.duhring[1].points[0].solutionBoilingPoint"), the request nests it.
 */
function definitionFieldMap(prefix: string): FieldMap {
  const map: FieldMap = {};
  for (const key of [
    'name',
    'id',
    'compositionVariable',
    'boilingPoint',
    'boilingPointRise',
    'heatCapacity',
    'enthalpy',
    'validity',
  ]) {
    map[key] = `${prefix}.${key}`;
  }
  return map;
}

/** Builds a custom liquor from a validated display-unit definition (errors name `fieldPrefix.…`). */
export function buildCustomLiquor(def: CustomLiquorDefinition, fieldPrefix: string, id?: string) {
  return calculate(definitionFieldMap(fieldPrefix), () => createCustomLiquor(toEngineDefinition(def, id)));
}

export interface ResolvedLiquor {
  model: LiquorModel;
  /** For provenance. */
  models: ModelRef[];
  /** Warnings about the definition itself (custom liquors). */
  definitionWarnings: EngineWarning[];
}

function modelRefs(model: LiquorModel): ModelRef[] {
  return [{ id: model.id, source: model.sources.map((s) => s.reference).join('; ') }];
}

/** Compiled stored liquors, oldest first (a Map keeps insertion order), bounded. */
const compiledStored = new Map<number, ResolvedLiquor>();
const COMPILED_STORED_MAX = 256;

/**
 * The liquor a request names: a built-in id, an id stored by this account, or an inline
 * definition. 404 'not-found' for an unknown id (the field is named in `errors`).
 */
export function resolveLiquor(ref: LiquorRef, db: Db, accountId: number, field: string): ResolvedLiquor {
  if (typeof ref === 'string') {
    const builtIn = findBuiltInLiquor(ref);
    if (builtIn) return { model: builtIn, models: modelRefs(builtIn), definitionWarnings: [] };
    const stored = findStoredLiquor(db, accountId, ref);
    if (!stored) {
      throw problem(
        'not-found',
        `There is no built-in liquor and no liquor stored by this account with the id "${ref}".`,
        {
          errors: [{ field, message: 'unknown liquor id', value: ref }],
        },
      );
    }
    // Stored rows are immutable (created or deleted, never edited) and row ids are never reused,
    // so a row compiles once; the lookup above still runs first, so a deleted or re-created
    // liquor is never served stale.
    const cached = compiledStored.get(stored.rowId);
    if (cached) return cached;
    const model = buildCustomLiquor(stored.definition, field, ref);
    const resolved = { model, models: modelRefs(model), definitionWarnings: model.definitionWarnings };
    if (compiledStored.size >= COMPILED_STORED_MAX) {
      compiledStored.delete(compiledStored.keys().next().value as number);
    }
    compiledStored.set(stored.rowId, resolved);
    return resolved;
  }
  const model = buildCustomLiquor(ref, field);
  return { model, models: modelRefs(model), definitionWarnings: model.definitionWarnings };
}

function boxOut(box: ValidityBox): LiquorSummary['validity'] {
  return {
    massFraction: { min: r(box.massFraction.min), max: r(box.massFraction.max) },
    temperature: {
      min: display(box.temperature.min, 'temperature'),
      max: display(box.temperature.max, 'temperature'),
    },
    ...(box.pressure
      ? {
          pressure: {
            min: display(box.pressure.min, 'pressure'),
            max: display(box.pressure.max, 'pressure'),
          },
        }
      : {}),
    ...(box.notes ? { notes: box.notes } : {}),
  };
}

/** The public description of a model in display units. */
export function summarise(model: LiquorModel, kind: LiquorSummary['kind'], id = model.id): LiquorSummary {
  const d = describeLiquor(model);
  return {
    id,
    name: d.name,
    kind,
    compositionVariable: d.compositionVariable,
    validity: boxOut(d.validity),
    limits: boxOut(d.limits),
    sources: d.sources,
    properties: d.properties,
    cautions: model.cautions,
  };
}

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
