/**
 * GET /v1/steam/saturation and POST /v1/steam/state: IAPWS-IF97 through the engine's adapter
 * (server/engine/steam/if97.ts). Request → contract (shared/contracts/steam.ts) → SI → engine →
 * display units → response, with `provenance`.
 */
import {
  SaturationQuerySchema,
  SteamStateRequestSchema,
  specs,
  type SaturationResponse,
  type SteamStateResponse,
} from '../../../shared/contracts/index.js';
import { IF97_CITATION } from '../../engine/evaporators/common.js';
import {
  saturationAtPressure,
  saturationAtTemperature,
  stateAtPH,
  stateAtPT,
  type WaterState,
} from '../../engine/steam/if97.js';
import { requireOperation } from '../middleware/operation.js';
import { calculate, display, provenance, r, readQuantity, sendCalculation, validate } from '../validation.js';
import type { V1RouteModule } from './module.js';

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

/** The saturation calculation on a validated query (shared with /v1/batch). */
export function runSaturation(query: unknown, engineVersion: string, prefix = ''): SaturationResponse {
  const q = validate(SaturationQuerySchema, query, prefix);
  const sat = calculate({ pressure: `${prefix}pressure`, temperature: `${prefix}temperature` }, () =>
    q.pressure !== undefined
      ? saturationAtPressure(readQuantity(q.pressure, specs.pressure, `${prefix}pressure`))
      : saturationAtTemperature(readQuantity(q.temperature!, specs.temperature, `${prefix}temperature`)),
  );
  return {
    pressure: display(sat.pressure, 'pressure'),
    temperature: display(sat.temperature, 'temperature'),
    latentHeat: display(sat.latentHeat, 'specificEnthalpy'),
    liquid: phase(sat.liquid),
    vapor: phase(sat.vapor),
    provenance: provenance(engineVersion, [IF97_MODEL]),
  };
}

/** The (p, T) or (p, h) state on a validated body (shared with /v1/batch). */
export function runSteamState(body: unknown, engineVersion: string, prefix = ''): SteamStateResponse {
  const b = validate(SteamStateRequestSchema, body, prefix);
  const map = {
    pressure: `${prefix}pressure`,
    temperature: `${prefix}temperature`,
    enthalpy: `${prefix}enthalpy`,
  };
  const state = calculate(map, () => {
    const p = readQuantity(b.pressure, specs.pressure, map.pressure);
    return b.temperature !== undefined
      ? stateAtPT(p, readQuantity(b.temperature, specs.temperature, map.temperature))
      : stateAtPH(p, readQuantity(b.enthalpy!, specs.enthalpy, map.enthalpy));
  });
  return { ...stateOut(state), provenance: provenance(engineVersion, [IF97_MODEL]) };
}

export const steamRoutes: V1RouteModule = {
  register(router, deps) {
    router.get('/steam/saturation', requireOperation('steam.saturation'), (req, res) => {
      sendCalculation(res, runSaturation(req.query, deps.engineVersion));
    });
    router.post('/steam/state', requireOperation('steam.state'), (req, res) => {
      sendCalculation(res, runSteamState(req.body, deps.engineVersion));
    });
  },
};
