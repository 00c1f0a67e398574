/**
 * The one vocabulary of physical quantities, and the one table of their default units: what a
 * plain number in a request means and what results are given in. The contracts
 * (shared/contracts/common.ts) document and range-check with it; server/units converts with it.
 * Plain data (no zod), so any room may import it.
 */

/** The physical quantities the API accepts and returns. */
export const quantityKinds = [
  'temperature',
  'temperatureDifference',
  'pressure',
  'massFlow',
  'specificEnthalpy',
  'specificHeatCapacity',
  'specificEntropy',
  'power',
  'area',
  'heatTransferCoefficient',
  'massFraction',
  'length',
  'fraction',
  'density',
  'specificEnergy',
  'velocity',
  'wettingRate',
  'foulingResistance',
  'thermalConductivity',
  'viscosity',
  'heatFlux',
] as const;
export type QuantityKind = (typeof quantityKinds)[number];

export interface DefaultUnit {
  /** ASCII symbol, as OpenAPI's `x-unit` states it. */
  symbol: string;
  /** For people: messages and documentation. */
  label: string;
  /** The unit's canonical spelling in server/units' tables (a plain number is read in it). */
  spelling: string;
  /** Strings with units a client may send instead. */
  examples: string[];
}

/** Default (display) unit of each kind: inputs given as plain numbers are read in it, outputs are given in it. */
export const defaultUnits: Record<QuantityKind, DefaultUnit> = {
  temperature: { symbol: 'degC', label: '°C', spelling: '°C', examples: ['38 degC', '311.15 K', '100 degF'] },
  temperatureDifference: {
    symbol: 'K',
    label: 'K (temperature difference)',
    spelling: 'K',
    examples: ['5 K', '9 delta_degF'],
  },
  pressure: {
    symbol: 'kPa',
    label: 'kPa absolute',
    spelling: 'kPa',
    examples: ['1.4 bar', '2 barg', '20 psig', '25 inHg vac'],
  },
  massFlow: {
    symbol: 'kg/s',
    label: 'kg/s',
    spelling: 'kg/s',
    examples: ['4.5 t/h', '12000 kg/h', '9000 lb/h', '20 klb/h'],
  },
  specificEnthalpy: {
    symbol: 'kJ/kg',
    label: 'kJ/kg',
    spelling: 'kJ/kg',
    examples: ['420 kJ/kg', '2.1e5 J/kg'],
  },
  specificHeatCapacity: {
    symbol: 'kJ/(kg*K)',
    label: 'kJ/(kg·K)',
    spelling: 'kJ/(kg·K)',
    examples: ['3.9 kJ/(kg*K)'],
  },
  specificEntropy: {
    symbol: 'kJ/(kg*K)',
    label: 'kJ/(kg·K)',
    spelling: 'kJ/(kg·K)',
    examples: ['1.3 kJ/(kg*K)'],
  },
  power: { symbol: 'kW', label: 'kW', spelling: 'kW', examples: ['2.5 MW', '800 kW'] },
  area: { symbol: 'm2', label: 'm²', spelling: 'm²', examples: ['120 m2', '1300 ft2'] },
  heatTransferCoefficient: {
    symbol: 'W/(m2*K)',
    label: 'W/(m²·K)',
    spelling: 'W/(m²·K)',
    examples: ['1.8 kW/(m2*K)', '1500 W/m2-K', '250 BTU/(h ft2 F)'],
  },
  massFraction: {
    symbol: '1',
    label: 'mass fraction 0–1',
    spelling: 'kg/kg',
    examples: ['65 %', '65 wt%', '350 g/kg'],
  },
  length: { symbol: 'm', label: 'm', spelling: 'm', examples: ['1.5 m', '60 in'] },
  fraction: { symbol: '1', label: 'fraction 0–1', spelling: 'kg/kg', examples: ['2 %'] },
  density: { symbol: 'kg/m3', label: 'kg/m³', spelling: 'kg/m³', examples: ['1050 kg/m3', '1.05 g/cm3'] },
  // Energy per mass processed, as plants state a compressor's consumption: kWh per tonne of water
  // evaporated (common practice).
  specificEnergy: {
    symbol: 'kWh/t',
    label: 'kWh/t',
    spelling: 'kWh/t',
    examples: ['20 kWh/t', '0.02 kWh/kg'],
  },
  velocity: { symbol: 'm/s', label: 'm/s', spelling: 'm/s', examples: ['1.8 m/s', '6 ft/s'] },
  wettingRate: {
    symbol: 'kg/(m*s)',
    label: 'kg/(m·s)',
    spelling: 'kg/(m·s)',
    examples: ['0.3 kg/(m*s)', '1000 kg/(m*h)'],
  },
  foulingResistance: {
    symbol: 'm2*K/W',
    label: 'm²·K/W',
    spelling: 'm²·K/W',
    examples: ['0.0002 m2*K/W', '0.001 h*ft2*F/Btu'],
  },
  thermalConductivity: {
    symbol: 'W/(m*K)',
    label: 'W/(m·K)',
    spelling: 'W/(m·K)',
    examples: ['16 W/(m*K)', '9.2 Btu/(h*ft*F)'],
  },
  viscosity: {
    symbol: 'mPa*s',
    label: 'mPa·s',
    spelling: 'mPa·s',
    examples: ['0.35 mPa*s', '1.2 cP', '0.0004 Pa*s'],
  },
  heatFlux: { symbol: 'kW/m2', label: 'kW/m²', spelling: 'kW/m²', examples: ['25 kW/m2', '25000 W/m2'] },
};
