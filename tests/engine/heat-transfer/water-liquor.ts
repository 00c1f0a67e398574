/**
 * A test liquor of pure water (x = 0 only): boiling point and enthalpy from IAPWS-IF97, density,
 * heat capacity, viscosity and thermal conductivity of the saturated liquid from the IAPWS
 * releases (steam/if97.ts). For checking film coefficients against python3-iapws; not a product
 * liquor.
 */
import { defineLiquorModel, type LiquorModel } from '../../../server/engine/liquors/model.js';
import {
  IF97_CITATION,
  saturatedLiquidAtTemperature,
  saturatedLiquidTransport,
  saturationTemperature,
} from '../../../server/engine/steam/if97.js';

// The estimate asks for four properties at one temperature: one IAPWS evaluation serves them.
let last = saturatedLiquidTransport(373.15);
function at(t: number) {
  if (t !== last.temperature) last = saturatedLiquidTransport(t);
  return last;
}

const box = { massFraction: { min: 0, max: 0 }, temperature: { min: 273.16, max: 623.15 } };

export const waterLiquor: LiquorModel = defineLiquorModel({
  id: 'test-water',
  name: 'Pure water (test liquor)',
  kind: 'custom',
  compositionVariable: 'none (pure water)',
  validity: box,
  limits: box,
  sources: [IF97_CITATION],
  cautions: [],
  boilingPoint: (_x: number, p: number) => saturationTemperature(p),
  enthalpy: (_x: number, t: number) => saturatedLiquidAtTemperature(t).enthalpy,
  heatCapacity: (_x: number, t: number) => at(t).heatCapacity,
  density: (_x: number, t: number) => at(t).density,
  viscosity: (_x: number, t: number) => at(t).viscosity,
  thermalConductivity: (_x: number, t: number) => at(t).thermalConductivity,
});
