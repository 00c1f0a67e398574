/**
 * POST /v1/evaporators/single-effect (design, or rating when body.area is given) and
 * POST /v1/evaporators/multiple-effect (equal-area design, or rating with given areas).
 * Request (display units or strings with units) → SI → engine → display units, with warnings,
 * cautions and provenance. Engine fields are named like the request's (feed.massFraction,
 * steam.pressure, body.area, effects[2]…), so the field map is mostly the identity.
 */
import {
  MultipleEffectRequestSchema,
  SingleEffectRequestSchema,
  specs,
  type MultipleEffectResponse,
  type SingleEffectResponse,
} from '../../../shared/contracts/index.js';
import type { Db } from '../../db/client.js';
import type { SteamSupplySpec } from '../../engine/evaporators/common.js';
import { designMultipleEffect, rateMultipleEffect } from '../../engine/evaporators/multiple-effect.js';
import {
  designSingleEffect,
  rateSingleEffect,
  type StreamState,
} from '../../engine/evaporators/single-effect.js';
import { operations } from '../../accounts/operations.js';
import { chargeUnits, requireOperation } from '../middleware/operation.js';
import { problem } from '../problem.js';
import {
  calculate,
  display,
  provenance,
  r,
  readOptional,
  readQuantity,
  sendCalculation,
  validate,
  warningsOut,
  type FieldMap,
} from '../validation.js';
import { resolveLiquor } from '../../liquors/index.js';
import { IF97_MODEL } from './steam.js';
import type { V1RouteModule } from './module.js';

function stream(s: StreamState) {
  return {
    massFlow: r(s.massFlow),
    massFraction: r(s.massFraction),
    temperature: display(s.temperature, 'temperature'),
    enthalpy: display(s.enthalpy, 'specificEnthalpy'),
  };
}

const EVAPORATOR_FIELDS: FieldMap = {
  saturationTemperature: { path: 'steam.temperature', kind: 'temperature' },
  'steam.saturationTemperature': { path: 'steam.temperature', kind: 'temperature' },
  pressure: 'body.pressure',
  productMassFraction: 'product.massFraction',
  massFraction: 'product.massFraction',
};

function steamSpec(
  s: {
    pressure?: number | string;
    temperature?: number | string;
    superheat?: number | string;
    condensateSubcooling?: number | string;
  },
  prefix: string,
): SteamSupplySpec {
  const pressure = readOptional(s.pressure, specs.pressure, `${prefix}steam.pressure`);
  const saturationTemperature = readOptional(s.temperature, specs.temperature, `${prefix}steam.temperature`);
  const superheat = readOptional(s.superheat, specs.superheat, `${prefix}steam.superheat`);
  const condensateSubcooling = readOptional(
    s.condensateSubcooling,
    specs.superheat,
    `${prefix}steam.condensateSubcooling`,
  );
  return {
    ...(pressure !== undefined ? { pressure } : {}),
    ...(saturationTemperature !== undefined ? { saturationTemperature } : {}),
    ...(superheat !== undefined ? { superheat } : {}),
    ...(condensateSubcooling !== undefined ? { condensateSubcooling } : {}),
  };
}

function prefixed(map: FieldMap, prefix: string): FieldMap {
  if (!prefix) return map;
  const out: FieldMap = {};
  for (const [k, v] of Object.entries(map))
    out[k] = typeof v === 'string' ? prefix + v : { ...v, path: prefix + v.path };
  for (const k of [
    'feed',
    'product',
    'steam',
    'body',
    'liquor',
    'effects',
    'areas',
    'overallHeatTransferCoefficients',
    'vaporBleeds',
    'heatLossFraction',
    'lastEffectPressure',
    'feedPreheat',
    'condensateFlash',
  ]) {
    out[k] ??= prefix + k;
  }
  return out;
}

/** Single-effect design or rating on an unvalidated body (shared with /v1/batch). */
export function runSingleEffect(
  body: unknown,
  db: Db,
  accountId: number,
  engineVersion: string,
  prefix = '',
): SingleEffectResponse {
  const b = validate(SingleEffectRequestSchema, body, prefix);
  const liquor = resolveLiquor(b.liquor, db, accountId, `${prefix}liquor`);
  const map = prefixed(EVAPORATOR_FIELDS, prefix);
  const q = <T extends number | string | undefined>(
    v: T,
    spec: Parameters<typeof readQuantity>[1],
    f: string,
  ) => readOptional(v, spec, prefix + f);
  const result = calculate(map, () => {
    const feedEnthalpy = q(b.feed.enthalpy, specs.enthalpy, 'feed.enthalpy');
    // The contract requires feed.massFlow in design and allows its absence only in rating with
    // product.massFraction, where the engine finds it; so it is never read and then dropped.
    const feedFlow = q(b.feed.massFlow, specs.massFlow, 'feed.massFlow');
    const feed = {
      ...(feedFlow !== undefined ? { massFlow: feedFlow } : {}),
      massFraction: readQuantity(b.feed.massFraction, specs.massFraction, `${prefix}feed.massFraction`),
      temperature: readQuantity(b.feed.temperature, specs.temperature, `${prefix}feed.temperature`),
      ...(feedEnthalpy !== undefined ? { enthalpy: feedEnthalpy } : {}),
    };
    const productFraction = q(b.product.massFraction, specs.massFraction, 'product.massFraction');
    const productFlow = q(b.product.massFlow, specs.massFlow, 'product.massFlow');
    const productEnthalpy = q(b.product.enthalpy, specs.enthalpy, 'product.enthalpy');
    const liquidHeight = q(b.body.liquidHeight, specs.liquidHeight, 'body.liquidHeight');
    const area = q(b.body.area, specs.area, 'body.area');
    const heatLossFraction = q(b.heatLossFraction, specs.heatLossFraction, 'heatLossFraction');
    const bodySpec = {
      pressure: readQuantity(b.body.pressure, specs.pressure, `${prefix}body.pressure`),
      overallHeatTransferCoefficient: readQuantity(
        b.body.overallHeatTransferCoefficient,
        specs.heatTransferCoefficient,
        `${prefix}body.overallHeatTransferCoefficient`,
      ),
      ...(liquidHeight !== undefined ? { liquidHeight } : {}),
    };
    const steam = steamSpec(b.steam, prefix);
    const common = {
      liquor: liquor.model,
      steam,
      ...(heatLossFraction !== undefined ? { heatLossFraction } : {}),
    };
    if (area === undefined) {
      if (feedFlow === undefined) {
        // unreachable past the contract; kept so the engine never sees a missing flow
        throw problem('validation-failed', 'feed.massFlow is required in design mode', {
          errors: [{ field: `${prefix}feed.massFlow`, message: 'is required in design mode (no body.area)' }],
        });
      }
      return designSingleEffect({
        ...common,
        feed: { ...feed, massFlow: feedFlow },
        body: bodySpec,
        product: {
          ...(productFraction !== undefined ? { massFraction: productFraction } : {}),
          ...(productFlow !== undefined ? { massFlow: productFlow } : {}),
          ...(productEnthalpy !== undefined ? { enthalpy: productEnthalpy } : {}),
        },
      });
    }
    if (productFlow !== undefined) {
      throw problem(
        'validation-failed',
        'Rating (body.area given) finds the product; give product.massFraction or nothing',
        {
          errors: [{ field: `${prefix}product.massFlow`, message: 'is not used in rating mode; omit it' }],
        },
      );
    }
    return rateSingleEffect({
      ...common,
      body: { ...bodySpec, area },
      ...(productFraction !== undefined
        ? {
            feed: {
              massFraction: feed.massFraction,
              temperature: feed.temperature,
              ...(feedEnthalpy !== undefined ? { enthalpy: feedEnthalpy } : {}),
            },
            product: {
              massFraction: productFraction,
              ...(productEnthalpy !== undefined ? { enthalpy: productEnthalpy } : {}),
            },
          }
        : { feed }),
    });
  });
  return {
    mode: result.mode,
    feed: stream(result.feed),
    product: stream(result.product),
    vapor: {
      massFlow: r(result.vapor.massFlow),
      pressure: display(result.vapor.pressure, 'pressure'),
      temperature: display(result.vapor.temperature, 'temperature'),
      enthalpy: display(result.vapor.enthalpy, 'specificEnthalpy'),
    },
    steam: {
      massFlow: r(result.steam.massFlow),
      pressure: display(result.steam.pressure, 'pressure'),
      temperature: display(result.steam.temperature, 'temperature'),
      latentHeat: display(result.steam.enthalpyIn - result.steam.enthalpyOut, 'specificEnthalpy'),
    },
    boilingPointRise: r(result.boilingPointRise),
    duty: display(result.duty, 'power'),
    temperatureDifference: r(result.temperatureDifference),
    area: r(result.area),
    steamEconomy: r(result.steamEconomy),
    specificSteamConsumption: r(result.specificSteamConsumption),
    waterBoilingPoint: display(result.waterBoilingPoint, 'temperature'),
    heatLoss: display(result.heatLoss, 'power'),
    warnings: warningsOut([...liquor.definitionWarnings, ...result.warnings], map),
    cautions: result.cautions,
    provenance: provenance(engineVersion, [IF97_MODEL, ...liquor.models]),
  };
}

/** Multiple-effect design or rating on an unvalidated body (shared with /v1/batch). */
export function runMultipleEffect(
  body: unknown,
  db: Db,
  accountId: number,
  engineVersion: string,
  prefix = '',
): MultipleEffectResponse {
  const b = validate(MultipleEffectRequestSchema, body, prefix);
  const liquor = resolveLiquor(b.liquor, db, accountId, `${prefix}liquor`);
  const map = prefixed(
    // The engine names the last effect's pressure itself, and labels what a liquor model refuses
    // inside effect i as effects[i].pressure / .boilingTemperature / .massFraction; a bare
    // "pressure" is not the last effect's.
    { ...EVAPORATOR_FIELDS, pressure: 'pressure', massFraction: 'product.massFraction' },
    prefix,
  );
  const result = calculate(map, () => {
    const F = readQuantity(b.feed.massFlow, specs.massFlow, `${prefix}feed.massFlow`);
    const xF = readQuantity(b.feed.massFraction, specs.massFraction, `${prefix}feed.massFraction`);
    const feed = {
      massFlow: F,
      massFraction: xF,
      temperature: readQuantity(b.feed.temperature, specs.temperature, `${prefix}feed.temperature`),
    };
    let productMassFraction = readOptional(
      b.product.massFraction,
      specs.massFraction,
      `${prefix}product.massFraction`,
    );
    const productFlow = readOptional(b.product.massFlow, specs.massFlow, `${prefix}product.massFlow`);
    if (productFlow !== undefined) productMassFraction = (F * xF) / productFlow; // solute balance F·x_F = L·x_L
    const input = {
      liquor: liquor.model,
      feed,
      steam: steamSpec(b.steam, prefix),
      lastEffectPressure: readQuantity(b.lastEffectPressure, specs.pressure, `${prefix}lastEffectPressure`),
      overallHeatTransferCoefficients: b.overallHeatTransferCoefficients.map((u, i) =>
        readQuantity(u, specs.heatTransferCoefficient, `${prefix}overallHeatTransferCoefficients[${i}]`),
      ),
      feedArrangement: b.feedArrangement,
      ...(b.vaporBleeds
        ? {
            vaporBleeds: b.vaporBleeds.map((v, i) => ({
              effect: v.effect,
              massFlow: readQuantity(v.massFlow, specs.bleedFlow, `${prefix}vaporBleeds[${i}].massFlow`),
            })),
          }
        : {}),
      ...(productMassFraction !== undefined ? { productMassFraction } : {}),
      ...(b.feedPreheat
        ? {
            feedPreheat: {
              temperature: readQuantity(
                b.feedPreheat.temperature,
                specs.temperature,
                `${prefix}feedPreheat.temperature`,
              ),
              source: b.feedPreheat.source,
            },
          }
        : {}),
      ...(b.condensateFlash !== undefined ? { condensateFlash: b.condensateFlash } : {}),
    };
    if (b.areas) {
      const areas = b.areas.map((a, i) => readQuantity(a, specs.area, `${prefix}areas[${i}]`));
      return rateMultipleEffect({ ...input, areas });
    }
    return designMultipleEffect(input);
  });
  return {
    effects: result.effects.map((e) => ({
      pressure: display(e.pressure, 'pressure'),
      vaporTemperature: display(e.vaporTemperature, 'temperature'),
      boilingPoint: display(e.boilingPoint, 'temperature'),
      boilingPointRise: r(e.boilingPointRise),
      temperatureDifference: r(e.temperatureDifference),
      liquorFlow: r(e.liquorOutFlow),
      massFraction: r(e.massFraction),
      vaporFlow: r(e.vaporFlow),
      duty: display(e.duty, 'power'),
      area: r(e.area),
      vaporBleed: r(e.vaporBleed),
    })),
    steam: {
      massFlow: r(result.steam.massFlow),
      pressure: display(result.steam.pressure, 'pressure'),
      temperature: display(result.steam.temperature, 'temperature'),
      latentHeat: display(result.steam.heatPerKg, 'specificEnthalpy'),
    },
    product: stream(result.product),
    totalArea: r(result.totalArea),
    evaporation: r(result.evaporation),
    steamEconomy: r(result.steamEconomy),
    iterations: result.iterations,
    residual: result.residual,
    feedPreheatDuty: display(result.feedPreheat?.duty ?? 0, 'power'),
    warnings: warningsOut([...liquor.definitionWarnings, ...result.warnings], map),
    cautions: result.cautions,
    provenance: provenance(engineVersion, [IF97_MODEL, ...liquor.models]),
  };
}

/** Units of a multiple-effect case: base + per effect (the operation catalogue). */
export function multipleEffectUnits(effects: number): number {
  const op = operations['evaporators.multiple-effect'];
  return op.units + op.unitsPerEffect * effects;
}

export const evaporatorRoutes: V1RouteModule = {
  register(router, deps) {
    router.post('/evaporators/single-effect', requireOperation('evaporators.single-effect'), (req, res) => {
      sendCalculation(
        res,
        runSingleEffect(req.body, deps.db, res.locals.auth!.accountId, deps.engineVersion),
      );
    });
    router.post(
      '/evaporators/multiple-effect',
      requireOperation('evaporators.multiple-effect'),
      (req, res) => {
        const effects = (req.body as { effects?: unknown } | undefined)?.effects;
        if (Number.isInteger(effects) && (effects as number) > 0 && (effects as number) <= 10) {
          chargeUnits(res, operations['evaporators.multiple-effect'].unitsPerEffect * (effects as number));
        }
        sendCalculation(
          res,
          runMultipleEffect(req.body, deps.db, res.locals.auth!.accountId, deps.engineVersion),
        );
      },
    );
  },
};
