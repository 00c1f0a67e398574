/**
 * Tables for the heat-transfer estimate: thermal conductivities of common tube materials and
 * typical fouling resistances. Plain data in SI, each row with its source. These are typical
 * values for a first estimate, not a substitute for the supplier's data of the tube actually
 * bought, or for fouling measured on the plant.
 */

export interface WallMaterial {
  id: string;
  name: string;
  /** k_w, W/(m·K), near room temperature. */
  thermalConductivity: number;
  source: string;
}

const INCROPERA_A1 =
  'F. P. Incropera and D. P. DeWitt, Fundamentals of Heat and Mass Transfer, 6th ed., Wiley (2007), Table A.1, at 300 K (from memory)';

/** Tube materials of evaporators, with k_w near room temperature (W/(m·K)). */
export const wallMaterials: readonly WallMaterial[] = [
  { id: 'carbon-steel', name: 'Plain carbon steel', thermalConductivity: 60.5, source: INCROPERA_A1 },
  { id: 'stainless-304', name: 'Stainless steel AISI 304', thermalConductivity: 14.9, source: INCROPERA_A1 },
  { id: 'stainless-316', name: 'Stainless steel AISI 316', thermalConductivity: 13.4, source: INCROPERA_A1 },
  {
    id: 'duplex-2205',
    name: 'Duplex stainless steel 2205 (UNS S32205)',
    thermalConductivity: 19,
    source: 'Outokumpu, Duplex stainless steel data sheet (2205: 19 W/(m·K) at 100 °C) (from memory)',
  },
  {
    id: 'titanium-grade-2',
    name: 'Titanium grade 2 (commercially pure)',
    thermalConductivity: 21.9,
    source: `${INCROPERA_A1}, titanium (commercially pure grade 2 is close to it)`,
  },
  {
    id: 'nickel-200',
    name: 'Nickel 200 (UNS N02200), for hot caustic',
    thermalConductivity: 70.2,
    source: 'Special Metals Corporation, Nickel 200 & 201 data sheet (70.2 W/(m·K) at 20 °C) (from memory)',
  },
  {
    id: 'copper-nickel-90-10',
    name: 'Copper-nickel 90/10 (UNS C70600)',
    thermalConductivity: 40,
    source: 'Copper Development Association, 90-10 copper-nickel data (40 W/(m·K) at 20 °C) (from memory)',
  },
];

export function findWallMaterial(id: string): WallMaterial | undefined {
  return wallMaterials.find((m) => m.id === id);
}

/** 1 h·ft²·°F/Btu in m²·K/W (Btu_IT, NIST SP 811 Appendix B). */
const TEMA_UNIT = (3600 * 0.3048 ** 2 * (5 / 9)) / 1055.05585262;

export interface FoulingResistance {
  id: string;
  service: string;
  /** m²·K/W */
  resistance: number;
  source: string;
}

const TEMA =
  'Standards of the Tubular Exchanger Manufacturers Association, 9th ed. (2007), Table RGP-T-2.4, typical fouling resistances, converted from h·ft²·°F/Btu (from memory)';

/** Typical fouling resistances (TEMA), m²·K/W: typical defaults for a first estimate. */
export const foulingResistances: readonly FoulingResistance[] = [
  { id: 'steam-oil-free', service: 'Steam, not oil-bearing', resistance: 0.0005 * TEMA_UNIT, source: TEMA },
  { id: 'distilled-water', service: 'Distilled water', resistance: 0.0005 * TEMA_UNIT, source: TEMA },
  {
    id: 'treated-feedwater',
    service: 'Treated boiler feedwater',
    resistance: 0.001 * TEMA_UNIT,
    source: TEMA,
  },
  {
    id: 'seawater-cool',
    service: 'Seawater below 52 °C (125 °F)',
    resistance: 0.0005 * TEMA_UNIT,
    source: TEMA,
  },
  {
    id: 'seawater-hot',
    service: 'Seawater above 52 °C (125 °F)',
    resistance: 0.001 * TEMA_UNIT,
    source: TEMA,
  },
  { id: 'caustic-solutions', service: 'Caustic solutions', resistance: 0.002 * TEMA_UNIT, source: TEMA },
];

/** The defaults used when a request gives no fouling: steam outside, a clean aqueous liquor inside. */
export const DEFAULT_FOULING = {
  /** Condensing steam (not oil-bearing), m²·K/W. */
  outside: foulingResistances[0]!,
  /** Treated boiler feedwater as the clean aqueous default of the liquor side, m²·K/W. */
  inside: foulingResistances[2]!,
} as const;
