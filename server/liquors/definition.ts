/**
 * Custom liquor definitions (inline in a request, stored by an account, uploaded in the console):
 * display units (°C, kJ/kg, kJ/(kg·K), mN/m) → the engine's SI definition → a LiquorModel.
 */
import type { CustomLiquorDefinition } from '../../shared/contracts/index.js';
import {
  createCustomLiquor,
  type CustomLiquorDefinition as EngineDefinition,
} from '../engine/liquors/custom.js';
import { KELVIN_OFFSET } from '../engine/types.js';
import { calculate, type FieldMap } from '../http/engine-errors.js';

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
    ...(def.density ? { density: { polynomial: [...def.density.polynomial] } } : {}),
    ...(def.viscosity ? { viscosity: { polynomial: [...def.viscosity.polynomial] } } : {}),
    ...(def.thermalConductivity
      ? { thermalConductivity: { polynomial: [...def.thermalConductivity.polynomial] } }
      : {}),
    // mN/m → N/m
    ...(def.surfaceTension
      ? { surfaceTension: { polynomial: def.surfaceTension.polynomial.map((c) => c * 1e-3) } }
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
    'density',
    'viscosity',
    'thermalConductivity',
    'surfaceTension',
  ]) {
    map[key] = `${prefix}.${key}`;
  }
  return map;
}

/** Builds a custom liquor from a validated display-unit definition (errors name `fieldPrefix.…`). */
export function buildCustomLiquor(def: CustomLiquorDefinition, fieldPrefix: string, id?: string) {
  return calculate(definitionFieldMap(fieldPrefix), () => createCustomLiquor(toEngineDefinition(def, id)));
}
