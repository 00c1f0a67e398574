/**
 * Steam tables (IAPWS-IF97 through the engine's adapter, server/engine/steam/if97.ts): the
 * saturation state at a pressure or temperature, and the state at (p, T) or (p, h).
 */
import {
  SaturationQuerySchema,
  SaturationResponseSchema,
  SteamStateRequestSchema,
  SteamStateResponseSchema,
  type SaturationResponse,
  type SteamStateResponse,
} from '../../../../shared/contracts/index.js';
import { operationCatalogue } from '../../../../shared/operations.js';
import { IF97_CITATION } from '../../../engine/evaporators/common.js';
import {
  saturationAtPressure,
  saturationAtTemperature,
  stateAtPH,
  stateAtPT,
  type WaterState,
} from '../../../engine/steam/if97.js';
import { calculate, type FieldMap } from '../../engine-errors.js';
import { display, provenance, r } from '../../output.js';
import { declareOperation } from '../operation.js';

export const IF97_MODEL = { id: IF97_CITATION.key, source: IF97_CITATION.reference };

/** Missing optional properties become NaN so the final guard refuses them rather than dropping them. */
function phase(s: WaterState): SaturationResponse['liquid'] {
  return {
    enthalpy: display(s.enthalpy, 'specificEnthalpy'),
    entropy: display(s.entropy, 'specificEntropy'),
    specificVolume: r(s.specificVolume),
    density: r(s.density),
    heatCapacity: display(s.heatCapacity ?? NaN, 'specificHeatCapacity'),
    viscosity: r(s.viscosity ?? NaN),
    thermalConductivity: r(s.thermalConductivity ?? NaN),
  };
}

/** Steam state → response body (without provenance). */
export function stateOut(s: WaterState): Omit<SteamStateResponse, 'provenance'> {
  const out: Omit<SteamStateResponse, 'provenance'> = {
    region: s.region,
    phase: s.phase,
    pressure: display(s.pressure, 'pressure'),
    temperature: display(s.temperature, 'temperature'),
    enthalpy: display(s.enthalpy, 'specificEnthalpy'),
    entropy: display(s.entropy, 'specificEntropy'),
    internalEnergy: display(s.internalEnergy, 'specificEnthalpy'),
    specificVolume: r(s.specificVolume),
    density: r(s.density),
  };
  if (s.heatCapacity !== undefined) out.heatCapacity = display(s.heatCapacity, 'specificHeatCapacity');
  if (s.isochoricHeatCapacity !== undefined) {
    out.isochoricHeatCapacity = display(s.isochoricHeatCapacity, 'specificHeatCapacity');
  }
  if (s.speedOfSound !== undefined) out.speedOfSound = r(s.speedOfSound);
  if (s.viscosity !== undefined) out.viscosity = r(s.viscosity);
  if (s.thermalConductivity !== undefined) out.thermalConductivity = r(s.thermalConductivity);
  if (s.quality !== undefined) out.quality = r(s.quality);
  return out;
}

/** The engine names its inputs like the request does. */
const STEAM_FIELDS: FieldMap = { pressure: 'pressure', temperature: 'temperature', enthalpy: 'enthalpy' };

export const steamSaturation = declareOperation({
  operation: operationCatalogue.steamSaturation,
  method: 'get',
  path: '/v1/steam/saturation',
  openApiName: 'getSteamSaturation',
  tag: 'Steam',
  summary: 'Saturated water and steam at a pressure or a temperature (IAPWS-IF97)',
  description:
    'Give exactly one of `pressure` or `temperature` (plain numbers in kPa absolute / °C, or strings with a unit). ' +
    'Example: the heating steam of an invented caustic concentrator at Harrow Vale works, `?pressure=3 barg`.',
  request: { query: SaturationQuerySchema },
  response: { description: 'Saturation properties', schema: SaturationResponseSchema },
  run: ({ query: q }, ctx): SaturationResponse => {
    const sat = calculate(STEAM_FIELDS, () =>
      q.pressure !== undefined ? saturationAtPressure(q.pressure) : saturationAtTemperature(q.temperature!),
    );
    return {
      pressure: display(sat.pressure, 'pressure'),
      temperature: display(sat.temperature, 'temperature'),
      latentHeat: display(sat.latentHeat, 'specificEnthalpy'),
      liquid: phase(sat.liquid),
      vapor: phase(sat.vapor),
      provenance: provenance(ctx.engineVersion, [IF97_MODEL]),
    };
  },
});

export const steamState = declareOperation({
  operation: operationCatalogue.steamState,
  method: 'post',
  path: '/v1/steam/state',
  openApiName: 'postSteamState',
  tag: 'Steam',
  summary: 'State of water or steam at (p, T) or (p, h) (IAPWS-IF97)',
  request: {
    body: SteamStateRequestSchema,
    example: { summary: 'Superheated steam in a header', value: { pressure: '10 bar', temperature: 250 } },
  },
  response: { description: 'The state', schema: SteamStateResponseSchema },
  run: ({ body: b }, ctx): SteamStateResponse => {
    const state = calculate(STEAM_FIELDS, () =>
      b.temperature !== undefined ? stateAtPT(b.pressure, b.temperature) : stateAtPH(b.pressure, b.enthalpy!),
    );
    return { ...stateOut(state), provenance: provenance(ctx.engineVersion, [IF97_MODEL]) };
  },
});
