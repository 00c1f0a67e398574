/**
 * Estimate of the overall heat-transfer coefficient of one evaporator effect: liquor inside
 * vertical tubes (falling film, forced circulation without boiling in the tubes, or natural
 * circulation), heating steam condensing outside them. All in SI.
 *
 * U is referred to the OUTSIDE area of the tubes:
 *
 *   1/U_o = 1/h_o + R_fo + R_wall + R_fi·(D_o/D_i) + (D_o/D_i)/h_i,
 *   R_wall = D_o·ln(D_o/D_i)/(2·k_w).
 *
 * The condensing coefficient depends on the temperature drop across the condensate film, and the
 * natural-circulation coefficient on the heat flux; so the surface temperature of the condensate
 * side is found (Brent) such that the same heat flux (per outside area) passes every resistance.
 * The condensate's properties are those of saturated liquid water (IAPWS) at the film temperature
 * T_f = (T_sat + T_s)/2, found by a fixed-point loop around that solve (to 0.01 K, where the
 * properties change by a few parts in 10⁴ and the coefficient by less).
 *
 * Liquor properties (ρ, μ, k, c_p) are taken at the given mass fraction and boiling temperature:
 * the representative state of the tube. In a falling-film tube the film Reynolds number is taken
 * at the mean of the inlet and outlet liquor flows, Γ_mean = Γ_in·(1 − f/2), where f is the
 * fraction of the inlet flow evaporated in the tube (default 0).
 *
 * Natural circulation (calandria tubes) is an approximation, warned as such: the liquid-only
 * Dittus–Boelter coefficient at an ASSUMED circulation velocity and Mostinski's nucleate-boiling
 * coefficient (reduced-pressure form; water's critical pressure) are added asymptotically,
 * h = (h_c² + h_nb²)^(1/2) (Kutateladze 1961). Why: in such tubes the liquor is first heated by
 * convection and then boils, and both mechanisms matter; Mostinski needs no liquor property beyond
 * the pressure (the liquor models give none for nucleation), and the asymptotic sum goes to each
 * mechanism alone where the other is small. The thermosiphon balance that would fix the velocity,
 * the length of the non-boiling zone and the hydrostatic head are not modelled.
 *
 * Designed to be called per effect: (liquor, x, T_boil, p_body, T_steam, tube, flow) in SI, with
 * the answer U plus its breakdown.
 */
import { EngineInputError, EngineNoSolutionError, EngineRangeError } from '../errors.js';
import type { LiquorModel } from '../liquors/model.js';
import { brentSolve } from '../numeric/roots.js';
import {
  IF97,
  IF97_CITATION,
  saturatedLiquidTransport,
  saturationAtTemperature,
  saturationPressure,
} from '../steam/if97.js';
import {
  addWarning,
  templated,
  type Citation,
  type EngineCaution,
  type EngineWarning,
  type WarningSink,
} from '../types.js';
import {
  CHUN_SEBAN_SOURCE,
  chunSebanCoefficient,
  chunSebanTransitionReynolds,
  condensateFilmReynolds,
  cylindricalWallResistance,
  DITTUS_BOELTER_SOURCE,
  dittusBoelterNusselt,
  fallingFilmReynolds,
  KUTATELADZE_SOURCE,
  kutateladzeAddition,
  MOSTINSKI_SOURCE,
  mostinskiNucleateBoiling,
  NUSSELT_SOURCE,
  nusseltCondensationHeatFlux,
  rohsenowLatentHeat,
} from './correlations.js';
import { DEFAULT_FOULING, findWallMaterial, wallMaterials } from './materials.js';

export type EvaporatorType = 'falling-film' | 'forced-circulation' | 'natural-circulation';
export const evaporatorTypes: readonly EvaporatorType[] = [
  'falling-film',
  'forced-circulation',
  'natural-circulation',
];

export interface TubeSpec {
  /** D_o, m */
  outsideDiameter: number;
  /** m */
  wallThickness: number;
  /** Heated length, m */
  length: number;
  /** k_w, W/(m·K); give this or `material`. */
  wallConductivity?: number;
  /** A row of {@link wallMaterials}. */
  material?: string;
}

export interface FlowSpec {
  /** Falling film: Γ at the tube inlet, kg/(m·s) per wetted perimeter (the inside circumference). */
  wettingRate?: number;
  /** Falling film: liquor fed to one tube, kg/s (Γ_in = ṁ/(π·D_i)). */
  liquorFlowPerTube?: number;
  /** Falling film: fraction of the inlet flow evaporated in the tube, 0 ≤ f < 1 (default 0). */
  evaporatedFraction?: number;
  /** Forced circulation: mean liquor velocity in the tubes, m/s. */
  tubeVelocity?: number;
  /** Natural circulation: the assumed mean circulation velocity in the tubes, m/s. */
  circulationVelocity?: number;
}

/** Liquor properties given by the caller (measured data), used instead of the model's. */
export interface LiquorPropertyValues {
  /** Pa·s */
  viscosity?: number;
  /** W/(m·K) */
  thermalConductivity?: number;
  /** kg/m³ */
  density?: number;
  /** J/(kg·K) */
  heatCapacity?: number;
}

export interface OverallCoefficientInput {
  evaporatorType: EvaporatorType;
  liquor: LiquorModel;
  massFraction: number;
  /** Boiling temperature of the liquor in the tubes, K. */
  boilingTemperature: number;
  /** Pressure in the body, Pa (reduced pressure of nucleate boiling). */
  bodyPressure: number;
  /** Saturation temperature of the heating steam, K. */
  steamTemperature: number;
  tube: TubeSpec;
  flow: FlowSpec;
  /** m²·K/W each; defaults from the TEMA table ({@link DEFAULT_FOULING}). */
  fouling?: { inside?: number; outside?: number };
  liquorProperties?: LiquorPropertyValues;
}

export type PropertySource = 'model' | 'given';

export interface BoilingSideResult {
  model: string;
  /** h_i on the inside area, W/(m²·K). */
  filmCoefficient: number;
  /** (D_o/D_i)/h_i, m²·K/W (outside area). */
  resistance: number;
  share: number;
  reynolds: number;
  reynoldsDefinition: string;
  prandtl: number;
  regime: string;
  /** On the inside area, W/m². */
  heatFlux: number;
  /** Temperature of the surface the liquor touches (fouling layer or metal), K. */
  surfaceTemperature: number;
  liquorTemperature: number;
  /** Falling film: Γ at inlet, mean and outlet, kg/(m·s); transition Re of Chun & Seban. */
  wettingRate?: { inlet: number; mean: number; outlet: number };
  transitionReynolds?: number;
  /** Forced/natural circulation: velocity used, m/s. */
  velocity?: number;
  /** Natural circulation: the two parts of h_i, W/(m²·K). */
  convectiveCoefficient?: number;
  nucleateBoilingCoefficient?: number;
  properties: {
    density: number;
    viscosity: number;
    thermalConductivity: number;
    heatCapacity: number;
    source: Record<'density' | 'viscosity' | 'thermalConductivity' | 'heatCapacity', PropertySource>;
  };
}

export interface CondensingSideResult {
  model: string;
  filmCoefficient: number;
  resistance: number;
  share: number;
  /** Re_δ = 4Γ/μ_l of the condensate at the tube bottom. */
  reynolds: number;
  prandtl: number;
  regime: 'laminar' | 'wavy-laminar' | 'turbulent';
  heatFlux: number;
  steamTemperature: number;
  /** Temperature of the surface the condensate wets, K. */
  surfaceTemperature: number;
  filmTemperature: number;
  /** h′_fg, J/kg */
  latentHeat: number;
}

export interface WallResult {
  conductivity: number;
  material?: string;
  resistance: number;
  share: number;
  heatFlux: number;
  outsideTemperature: number;
  insideTemperature: number;
}

export interface FoulingLayerResult {
  /** As given (or defaulted), m²·K/W on its own surface. */
  resistance: number;
  /** Referred to the outside area, m²·K/W. */
  referredResistance: number;
  share: number;
  defaulted: boolean;
  heatFlux: number;
}

export interface OverallCoefficientResult {
  evaporatorType: EvaporatorType;
  /** U_o, W/(m²·K), referred to the outside area of the tubes. */
  overallHeatTransferCoefficient: number;
  /** T_steam − T_boil, K */
  temperatureDifference: number;
  /** On the outside area, W/m². */
  heatFlux: number;
  insideDiameter: number;
  /** Σ of the resistances (= 1/U_o), m²·K/W. */
  totalResistance: number;
  boilingSide: BoilingSideResult;
  wall: WallResult;
  condensingSide: CondensingSideResult;
  fouling: { inside: FoulingLayerResult; outside: FoulingLayerResult };
  /** Iterations of the film-temperature loop and of the last wall-temperature solve. */
  iterations: { filmTemperature: number; wallTemperature: number };
  assumptions: string[];
  warnings: EngineWarning[];
  cautions: EngineCaution[];
  sources: Citation[];
}

/** Common practice (from memory): Γ_min ≈ 0.03–0.05 kg/(m·s) for water films; the upper end is used. */
export const MIN_WETTING_RATE = 0.05;
/**
 * Common practice (from memory): falling-film evaporators are run below ≈ 40 kW/m² to keep
 * nucleate boiling and dry patches out of the film.
 */
export const MAX_FALLING_FILM_HEAT_FLUX = 40_000;
/** Chun & Seban's experiments (from memory): water films, Re 320–21 000, Pr 1.77–5.7. */
const CHUN_SEBAN_DATA = { reynolds: { min: 320, max: 21_000 }, prandtl: { min: 1.77, max: 5.7 } };
/** Dittus–Boelter range as printed with Incropera & DeWitt eq. 8.60. */
const DITTUS_BOELTER_RANGE = { reynolds: 10_000, prandtl: { min: 0.6, max: 160 }, lengthToDiameter: 10 };
/** Condensate-film regimes (Incropera & DeWitt Fig. 10.9): wave-free ≤ 30, wavy ≤ 1800. */
const CONDENSATE_WAVY = 30;
const CONDENSATE_TURBULENT = 1800;

const PROPERTY_NAMES = {
  viscosity: 'viscosity',
  thermalConductivity: 'thermal conductivity',
  density: 'density',
  heatCapacity: 'heat capacity',
} as const;
type PropertyKey = keyof typeof PROPERTY_NAMES;

function liquorProperty(
  input: OverallCoefficientInput,
  key: PropertyKey,
  warnings: WarningSink,
): { value: number; source: PropertySource } {
  const given = input.liquorProperties?.[key];
  if (given !== undefined) return { value: given, source: 'given' };
  const fn = input.liquor[key];
  if (typeof fn !== 'function') {
    throw new EngineInputError(
      `liquorProperties.${key}`,
      `The liquor model "${input.liquor.id}" gives no ${PROPERTY_NAMES[key]}, which the ${input.evaporatorType} estimate needs: give liquorProperties.${key} (measured at the liquor's state) or choose a liquor whose model gives it`,
    );
  }
  const value = fn.call(input.liquor, input.massFraction, input.boilingTemperature, warnings);
  if (!Number.isFinite(value) || value <= 0) {
    throw new EngineInputError(
      `liquorProperties.${key}`,
      `The liquor model "${input.liquor.id}" gives no usable ${PROPERTY_NAMES[key]} at this state; give liquorProperties.${key}`,
    );
  }
  return { value, source: 'model' };
}

function positive(field: string, value: number | undefined, unit: string, max = Infinity): number {
  if (value === undefined || !Number.isFinite(value) || value <= 0 || value > max) {
    throw new EngineRangeError(field, value ?? NaN, { min: 0, max, unit });
  }
  return value;
}

const CONDENSATE_MAX_TEMPERATURE = IF97.region13Temperature;
/** The water critical pressure used for the reduced pressure of nucleate boiling, Pa. */
export const NUCLEATION_CRITICAL_PRESSURE = IF97.criticalPressure;
/** The film temperature of the condensate properties is converged to this, K. */
const FILM_TEMPERATURE_TOLERANCE = 0.01;

/** Largest fouling resistance accepted, m²·K/W. */
const MAX_FOULING_RESISTANCE = 0.1;

/**
 * Estimates U of an evaporator tube (see the module comment for the model).
 * Refuses (EngineRangeError / EngineInputError naming the field) a wall thicker than the radius,
 * steam not hotter than the boiling liquor, a missing flow for the evaporator type, and a liquor
 * without the properties needed (unless given in `liquorProperties`).
 */
export function estimateOverallCoefficient(input: OverallCoefficientInput): OverallCoefficientResult {
  const warnings: EngineWarning[] = [];
  const { tube, flow, evaporatorType: type } = input;
  const Do = positive('tube.outsideDiameter', tube.outsideDiameter, 'm');
  const t = tube.wallThickness;
  if (!Number.isFinite(t) || t <= 0 || t >= Do / 2) {
    throw new EngineRangeError(
      'tube.wallThickness',
      t,
      { min: 0, max: Do / 2, unit: 'm' },
      undefined,
      undefined,
      'the wall must be thinner than the tube radius',
    );
  }
  const Di = Do - 2 * t;
  const L = positive('tube.length', tube.length, 'm');
  const material = tube.material === undefined ? undefined : findWallMaterial(tube.material);
  if (tube.material !== undefined && material === undefined) {
    throw new EngineInputError(
      'tube.material',
      `Unknown tube material "${tube.material}"; known: ${wallMaterials.map((m) => m.id).join(', ')}`,
    );
  }
  const kw = positive(
    'tube.wallConductivity',
    tube.wallConductivity ?? material?.thermalConductivity,
    'W/(m·K)',
  );

  const Tb = input.boilingTemperature;
  const Ts = input.steamTemperature;
  if (!Number.isFinite(Tb) || Tb < IF97.minTemperature || Tb >= CONDENSATE_MAX_TEMPERATURE) {
    throw new EngineRangeError('boilingTemperature', Tb, {
      min: IF97.minTemperature,
      max: CONDENSATE_MAX_TEMPERATURE,
      unit: 'K',
    });
  }
  if (!Number.isFinite(Ts) || Ts <= Tb || Ts > CONDENSATE_MAX_TEMPERATURE) {
    throw new EngineRangeError(
      'steamTemperature',
      Ts,
      { min: Tb, max: CONDENSATE_MAX_TEMPERATURE, unit: 'K' },
      undefined,
      undefined,
      'the heating steam must condense above the boiling liquor, within the region of the condensate properties',
    );
  }
  const dT = Ts - Tb;

  const foulingOutsideGiven = input.fouling?.outside;
  const foulingInsideGiven = input.fouling?.inside;
  const Rfo = foulingOutsideGiven ?? DEFAULT_FOULING.outside.resistance;
  const Rfi = foulingInsideGiven ?? DEFAULT_FOULING.inside.resistance;
  // The range said is the range checked: up to 0.1 m²·K/W (U below 10 W/(m²·K) is no evaporator),
  // the contract's physical range of a fouling resistance.
  if (!Number.isFinite(Rfo) || Rfo < 0 || Rfo > MAX_FOULING_RESISTANCE)
    throw new EngineRangeError('fouling.outside', Rfo, {
      min: 0,
      max: MAX_FOULING_RESISTANCE,
      unit: 'm²·K/W',
    });
  if (!Number.isFinite(Rfi) || Rfi < 0 || Rfi > MAX_FOULING_RESISTANCE)
    throw new EngineRangeError('fouling.inside', Rfi, {
      min: 0,
      max: MAX_FOULING_RESISTANCE,
      unit: 'm²·K/W',
    });

  const ratio = Do / Di;
  const Rwall = cylindricalWallResistance(Do, Di, kw);
  const RfiOut = Rfi * ratio;
  const Rmid = Rfo + Rwall + RfiOut;

  // Liquor properties at the representative state.
  const rho = liquorProperty(input, 'density', warnings);
  const mu = liquorProperty(input, 'viscosity', warnings);
  const k = liquorProperty(input, 'thermalConductivity', warnings);
  const cp = liquorProperty(input, 'heatCapacity', warnings);
  const prandtl = (cp.value * mu.value) / k.value;
  const properties: BoilingSideResult['properties'] = {
    density: rho.value,
    viscosity: mu.value,
    thermalConductivity: k.value,
    heatCapacity: cp.value,
    source: {
      density: rho.source,
      viscosity: mu.source,
      thermalConductivity: k.source,
      heatCapacity: cp.source,
    },
  };

  const assumptions: string[] = [
    'U is referred to the outside area of the tubes: 1/U_o = 1/h_o + R_fo + R_wall + R_fi·(D_o/D_i) + (D_o/D_i)/h_i',
    'liquor properties are taken at the given mass fraction and boiling temperature, the representative state of the tube',
    'the condensate film has the properties of saturated liquid water at the film temperature (T_sat + T_s)/2; the steam is saturated and free of non-condensable gases',
  ];
  const sources: Citation[] = [
    IF97_CITATION,
    {
      key: 'iapws-transport',
      reference:
        'IAPWS R12-08 (viscosity of ordinary water substance, 2008) and IAPWS R15-11 (thermal conductivity, 2011), condensate film',
    },
    { key: 'nusselt-1916', reference: NUSSELT_SOURCE },
  ];
  if (material) sources.push({ key: `wall-${material.id}`, reference: material.source });
  if (foulingInsideGiven === undefined || foulingOutsideGiven === undefined) {
    sources.push({ key: 'tema-fouling', reference: DEFAULT_FOULING.outside.source });
  }

  // Boiling side: h_i as a function of the inside heat flux (constant except natural circulation).
  let boilingModel: string;
  let reynolds: number;
  let reynoldsDefinition: string;
  let regime: string;
  let hConvective = 0;
  let velocity: number | undefined;
  let wetting: BoilingSideResult['wettingRate'];
  let transitionReynolds: number | undefined;
  let nucleate = false;
  // Mostinski's reduced pressure uses water's critical pressure: the liquor is taken as water for nucleation.
  const pCritical = NUCLEATION_CRITICAL_PRESSURE;

  if (type === 'falling-film') {
    const perimeter = Math.PI * Di;
    let gammaIn: number;
    if (flow.wettingRate !== undefined && flow.liquorFlowPerTube !== undefined) {
      throw new EngineInputError(
        'flow.wettingRate',
        'give flow.wettingRate or flow.liquorFlowPerTube, not both',
      );
    }
    if (flow.wettingRate !== undefined) gammaIn = positive('flow.wettingRate', flow.wettingRate, 'kg/(m·s)');
    else if (flow.liquorFlowPerTube !== undefined) {
      gammaIn = positive('flow.liquorFlowPerTube', flow.liquorFlowPerTube, 'kg/s') / perimeter;
    } else {
      throw new EngineInputError(
        'flow.wettingRate',
        'a falling-film estimate needs flow.wettingRate (kg/(m·s) per wetted perimeter) or flow.liquorFlowPerTube (kg/s)',
      );
    }
    const f = flow.evaporatedFraction ?? 0;
    if (!Number.isFinite(f) || f < 0 || f >= 1) {
      throw new EngineRangeError('flow.evaporatedFraction', f, { min: 0, max: 1, unit: 'kg/kg' });
    }
    const gammaMean = gammaIn * (1 - f / 2);
    const gammaOut = gammaIn * (1 - f);
    wetting = { inlet: gammaIn, mean: gammaMean, outlet: gammaOut };
    reynolds = fallingFilmReynolds(gammaMean, mu.value);
    reynoldsDefinition =
      'Re = 4Γ/μ, Γ = liquor mass flow per wetted perimeter (π·D_i) at the mean of inlet and outlet flow';
    transitionReynolds = chunSebanTransitionReynolds(prandtl);
    regime = reynolds < transitionReynolds ? 'wavy-laminar' : 'turbulent';
    hConvective = chunSebanCoefficient(gammaMean, rho.value, mu.value, k.value, cp.value);
    boilingModel = 'chun-seban-1971';
    sources.push({ key: 'chun-seban-1971', reference: CHUN_SEBAN_SOURCE });
    assumptions.push(
      `falling film inside the tubes; film Reynolds number at the mean liquor flow Γ_mean = Γ_in·(1 − f/2) with f = ${Number(f.toPrecision(6))} the evaporated fraction`,
    );
    if (gammaOut < MIN_WETTING_RATE) {
      addWarning(warnings, {
        code: 'wetting-rate-below-minimum',
        field: flow.liquorFlowPerTube !== undefined ? 'flow.liquorFlowPerTube' : 'flow.wettingRate',
        message: `The wetting rate at the tube outlet, ${gammaOut} kg/(m·s), is below ${MIN_WETTING_RATE} kg/(m·s), the common-practice minimum for a stable water film (≈ 0.03–0.05 kg/(m·s), from memory; more for viscous liquors): the film may break into rivulets and dry patches, where U falls and scale forms`,
        ...templated(
          `The wetting rate at the tube outlet, {outlet}, is below {minimum}, the common-practice minimum for a stable water film (≈ 0.03–0.05 kg/(m·s), from memory; more for viscous liquors): the film may break into rivulets and dry patches, where U falls and scale forms`,
          'wettingRate',
          { outlet: gammaOut, minimum: MIN_WETTING_RATE },
        ),
      });
    }
    if (
      reynolds < CHUN_SEBAN_DATA.reynolds.min ||
      reynolds > CHUN_SEBAN_DATA.reynolds.max ||
      prandtl < CHUN_SEBAN_DATA.prandtl.min ||
      prandtl > CHUN_SEBAN_DATA.prandtl.max
    ) {
      const text = `The film (Re = ${round3(reynolds)}, Pr = ${round3(prandtl)}) lies outside the water films of Chun & Seban's experiments (Re 320–21 000, Pr 1.77–5.7, from memory): the falling-film coefficient is extrapolated`;
      addWarning(warnings, { code: 'correlation-extrapolated', field: 'boilingSide', message: text });
    }
  } else {
    const isForced = type === 'forced-circulation';
    const field = isForced ? 'flow.tubeVelocity' : 'flow.circulationVelocity';
    const v = isForced ? flow.tubeVelocity : flow.circulationVelocity;
    if (v === undefined) {
      throw new EngineInputError(
        field,
        isForced
          ? 'a forced-circulation estimate needs flow.tubeVelocity (m/s)'
          : 'a natural-circulation estimate needs flow.circulationVelocity (m/s), the assumed mean velocity in the tubes',
      );
    }
    velocity = positive(field, v, 'm/s');
    reynolds = (rho.value * velocity * Di) / mu.value;
    reynoldsDefinition = 'Re = ρ·u·D_i/μ, liquor properties at the boiling temperature';
    hConvective = (dittusBoelterNusselt(reynolds, prandtl) * k.value) / Di;
    regime =
      reynolds >= DITTUS_BOELTER_RANGE.reynolds ? 'turbulent' : reynolds >= 2300 ? 'transitional' : 'laminar';
    sources.push({ key: 'dittus-boelter', reference: DITTUS_BOELTER_SOURCE });
    const outside: string[] = [];
    if (reynolds < DITTUS_BOELTER_RANGE.reynolds) outside.push(`Re = ${round3(reynolds)} < 10 000`);
    if (prandtl < DITTUS_BOELTER_RANGE.prandtl.min || prandtl > DITTUS_BOELTER_RANGE.prandtl.max) {
      outside.push(`Pr = ${round3(prandtl)} outside 0.6–160`);
    }
    if (L / Di < DITTUS_BOELTER_RANGE.lengthToDiameter) outside.push(`L/D = ${round3(L / Di)} < 10`);
    if (outside.length > 0) {
      const text = `The tube-side flow lies outside the range of the Dittus–Boelter equation (${outside.join('; ')}; Incropera & DeWitt, 6th ed., eq. 8.60): the convective coefficient is extrapolated`;
      addWarning(warnings, { code: 'correlation-extrapolated', field: 'boilingSide', message: text });
    }
    if (isForced) {
      boilingModel = 'dittus-boelter';
      assumptions.push(
        'forced circulation: the liquor is heated without boiling in the tubes (boiling is suppressed by the static head and flashes above them); Dittus–Boelter with n = 0.4 (heating)',
      );
    } else {
      boilingModel = 'kutateladze-mostinski';
      nucleate = true;
      regime = 'nucleate-boiling';
      sources.push({ key: 'mostinski-1963', reference: MOSTINSKI_SOURCE });
      sources.push({ key: 'kutateladze-1961', reference: KUTATELADZE_SOURCE });
      assumptions.push(
        `natural circulation: the circulation velocity ${Number(velocity.toPrecision(6))} m/s is an assumption given with the request, not computed from the thermosiphon balance`,
        "natural circulation: h_i = (h_c² + h_nb²)^(1/2) (Kutateladze's asymptotic addition) of the liquid-only Dittus–Boelter coefficient at that velocity and Mostinski's nucleate-boiling coefficient with the critical pressure of water (the liquor taken as water for nucleation); the non-boiling zone at the tube bottom and the hydrostatic head are not modelled",
      );
      const text =
        'The natural-circulation coefficient is approximate: a liquid-only convective coefficient at an assumed circulation velocity combined with a pure-fluid nucleate-boiling correlation (Mostinski) evaluated for water; compare with plant data before relying on it';
      addWarning(warnings, { code: 'natural-circulation-approximate', message: text });
    }
  }

  if (!(hConvective > 0) || !Number.isFinite(hConvective)) {
    // Only absurd property values get here (a density or viscosity at the edge of the doubles).
    throw new EngineInputError(
      'liquorProperties',
      'The liquor properties give no finite liquor-side film coefficient; check the viscosity, density, conductivity and heat capacity',
    );
  }
  const pBody = input.bodyPressure;
  if (nucleate && (!Number.isFinite(pBody) || pBody <= 0 || pBody >= pCritical)) {
    throw new EngineRangeError('bodyPressure', pBody, { min: 0, max: pCritical, unit: 'Pa' });
  }
  const hc = hConvective;
  const hInside = nucleate
    ? (qi: number): number => kutateladzeAddition(hc, mostinskiNucleateBoiling(qi, pBody, pCritical))
    : (): number => hc;
  /** Temperature drop from the liquor-side surface to the liquor at inside heat flux qi. */
  const boilingDrop = (qi: number): number => qi / hInside(qi);

  // Condensing side: h_fg and ρ_v at T_sat; the film's properties at T_f (fixed-point loop).
  const sat = saturationAtTemperature(Ts, { transport: false });
  const hfg = sat.latentHeat;
  const rhoV = sat.vapor.density;
  // First guess: a quarter of ΔT across the condensate film (T_f then sits an eighth below T_sat).
  let Tf = Ts - 0.125 * dT;
  let film = saturatedLiquidTransport(Tf);
  let surface = Ts;
  let brentIterations = 0;
  let loops = 0;
  const heatFluxAt = (Tsurf: number): number => {
    const sub = Ts - Tsurf;
    return nusseltCondensationHeatFlux(
      film.density,
      rhoV,
      film.thermalConductivity,
      film.viscosity,
      rohsenowLatentHeat(hfg, film.heatCapacity, sub),
      L,
      sub,
    );
  };
  const residual = (Tsurf: number): number => {
    const q = heatFluxAt(Tsurf);
    return Tsurf - Tb - q * Rmid - boilingDrop(q * ratio);
  };
  for (;;) {
    loops++;
    const solved = brentSolve(residual, Tb, Ts, { tol: 1e-12 });
    surface = solved.root;
    brentIterations = solved.iterations;
    const next = (Ts + surface) / 2;
    if (Math.abs(next - Tf) < FILM_TEMPERATURE_TOLERANCE || loops >= 20) break;
    Tf = next;
    film = saturatedLiquidTransport(Tf);
  }

  const q = heatFluxAt(surface);
  const sub = Ts - surface;
  const hfgPrime = rohsenowLatentHeat(hfg, film.heatCapacity, sub);
  const ho = q / sub;
  const qi = q * ratio;
  const hi = hInside(qi);
  const Rcond = 1 / ho;
  const Rboil = ratio / hi;
  const total = Rcond + Rfo + Rwall + RfiOut + Rboil;
  const U = q / dT;

  const tWallOut = surface - q * Rfo;
  const tWallIn = tWallOut - q * Rwall;
  const tLiquorSurface = tWallIn - q * RfiOut;

  const reCond = condensateFilmReynolds(q, L, film.viscosity, hfgPrime);
  const condRegime =
    reCond <= CONDENSATE_WAVY ? 'laminar' : reCond <= CONDENSATE_TURBULENT ? 'wavy-laminar' : 'turbulent';
  if (reCond > CONDENSATE_WAVY) {
    const turbulent = reCond > CONDENSATE_TURBULENT;
    const text = turbulent
      ? `The condensate film at the tube bottom is turbulent (Re_δ = 4Γ/μ = ${round3(reCond)} > 1800; Incropera & DeWitt, 6th ed., Fig. 10.9): Nusselt's laminar theory does not apply and the condensing coefficient is uncertain`
      : `The condensate film at the tube bottom is wavy (Re_δ = 4Γ/μ = ${round3(reCond)} > 30; Incropera & DeWitt, 6th ed., Fig. 10.9): Nusselt's laminar theory underpredicts the condensing coefficient there, so this side is conservative`;
    addWarning(warnings, {
      code: turbulent ? 'condensate-film-turbulent' : 'condensate-film-wavy',
      field: 'condensingSide',
      message: text,
    });
  }
  if (type === 'falling-film' && qi > MAX_FALLING_FILM_HEAT_FLUX) {
    addWarning(warnings, {
      code: 'falling-film-heat-flux-high',
      field: 'boilingSide',
      message: `The heat flux into the film, ${qi} W/m², is above ${MAX_FALLING_FILM_HEAT_FLUX} W/m²: nucleate boiling in the film and film break-up become likely (common practice, from memory); the film coefficient may not hold`,
      ...templated(
        'The heat flux into the film, {flux}, is above {limit}: nucleate boiling in the film and film break-up become likely (common practice, from memory); the film coefficient may not hold',
        'heatFlux',
        { flux: qi, limit: MAX_FALLING_FILM_HEAT_FLUX },
      ),
    });
  }

  if (![U, ho, hi, total, q].every((v) => Number.isFinite(v) && v > 0)) {
    throw new EngineNoSolutionError('The resistances give no finite overall coefficient for these inputs', {
      reason: 'non-finite',
    });
  }
  const share = (r: number): number => r / total;
  return {
    evaporatorType: type,
    overallHeatTransferCoefficient: U,
    temperatureDifference: dT,
    heatFlux: q,
    insideDiameter: Di,
    totalResistance: total,
    boilingSide: {
      model: boilingModel,
      filmCoefficient: hi,
      resistance: Rboil,
      share: share(Rboil),
      reynolds,
      reynoldsDefinition,
      prandtl,
      regime,
      heatFlux: qi,
      surfaceTemperature: tLiquorSurface,
      liquorTemperature: Tb,
      ...(wetting ? { wettingRate: wetting } : {}),
      ...(transitionReynolds !== undefined ? { transitionReynolds } : {}),
      ...(velocity !== undefined ? { velocity } : {}),
      ...(nucleate
        ? {
            convectiveCoefficient: hc,
            nucleateBoilingCoefficient: mostinskiNucleateBoiling(qi, pBody, pCritical),
          }
        : {}),
      properties,
    },
    wall: {
      conductivity: kw,
      ...(material ? { material: material.id } : {}),
      resistance: Rwall,
      share: share(Rwall),
      heatFlux: q,
      outsideTemperature: tWallOut,
      insideTemperature: tWallIn,
    },
    condensingSide: {
      model: 'nusselt-rohsenow',
      filmCoefficient: ho,
      resistance: Rcond,
      share: share(Rcond),
      reynolds: reCond,
      prandtl: (film.heatCapacity * film.viscosity) / film.thermalConductivity,
      regime: condRegime,
      heatFlux: q,
      steamTemperature: Ts,
      surfaceTemperature: surface,
      filmTemperature: Tf,
      latentHeat: hfgPrime,
    },
    fouling: {
      outside: {
        resistance: Rfo,
        referredResistance: Rfo,
        share: share(Rfo),
        defaulted: foulingOutsideGiven === undefined,
        heatFlux: q,
      },
      inside: {
        resistance: Rfi,
        referredResistance: RfiOut,
        share: share(RfiOut),
        defaulted: foulingInsideGiven === undefined,
        heatFlux: qi,
      },
    },
    iterations: { filmTemperature: loops, wallTemperature: brentIterations },
    assumptions,
    warnings,
    cautions: [
      {
        code: 'estimate-only',
        message:
          'U is an estimate from published correlations with typical fouling: confirm it against plant data or the equipment supplier before sizing. The steam chest and body are pressure (or vacuum) equipment: their design and operation fall under local codes and need a licensed engineer.',
      },
      ...input.liquor.cautions,
    ],
    sources,
  };
}

function round3(v: number): number {
  return Number(v.toPrecision(3));
}

/**
 * The boiling state of a liquor in the tubes from either the body pressure or the boiling
 * temperature (exactly one): T_b = boilingPoint(x, p), or p such that boilingPoint(x, p) = T_b.
 */
export function liquorBoilingState(
  liquor: LiquorModel,
  massFraction: number,
  given: { bodyPressure?: number; boilingTemperature?: number },
  warnings: WarningSink,
): { boilingTemperature: number; bodyPressure: number } {
  if (given.bodyPressure !== undefined) {
    return {
      bodyPressure: given.bodyPressure,
      boilingTemperature: liquor.boilingPoint(massFraction, given.bodyPressure, warnings),
    };
  }
  const T = given.boilingTemperature;
  if (T === undefined || !Number.isFinite(T) || T <= IF97.minTemperature || T >= CONDENSATE_MAX_TEMPERATURE) {
    throw new EngineRangeError('boilingTemperature', T ?? NaN, {
      min: IF97.minTemperature,
      max: CONDENSATE_MAX_TEMPERATURE,
      unit: 'K',
    });
  }
  // A boiling-point rise ≥ 0 puts p at or below p_sat(T); the bracket widens downwards in steps
  // (5 K of rise covers dilute liquors, 150 K every liquor here) so that a model is asked only
  // for pressures near the answer.
  const g = (lnP: number): number => liquor.boilingPoint(massFraction, Math.exp(lnP), undefined) - T;
  const hi = Math.log(saturationPressure(T) * (1 + 1e-9));
  let lo = hi;
  let p: number;
  try {
    for (const rise of [5, 20, 60, 150]) {
      lo = Math.log(saturationPressure(Math.max(IF97.minTemperature, T - rise)));
      if (g(lo) < 0) break;
    }
    p = Math.exp(brentSolve(g, lo, hi, { tol: 1e-13 }).root);
    liquor.boilingPoint(massFraction, p, warnings);
  } catch (error) {
    // The model refused a pressure the search tried: say it of the temperature the caller gave,
    // with the range in which this liquor boils at this mass fraction.
    if (!(error instanceof EngineRangeError) || error.field === 'massFraction') throw error;
    throw new EngineRangeError(
      'boilingTemperature',
      T,
      boilingRange(liquor, massFraction),
      undefined,
      undefined,
      `the ${liquor.id} model gives boiling points only within this range at this mass fraction`,
    );
  }
  return { boilingTemperature: T, bodyPressure: p };
}

/** Where a liquor boils at x: its boiling points at the ends of its pressure limits (else its temperature limits), K. */
function boilingRange(liquor: LiquorModel, massFraction: number): { min: number; max: number; unit: string } {
  const at = (p: number | undefined, fallback: number): number => {
    if (p === undefined) return fallback;
    try {
      return liquor.boilingPoint(massFraction, p, undefined);
    } catch {
      return fallback;
    }
  };
  return {
    min: at(liquor.limits.pressure?.min, liquor.limits.temperature.min),
    max: at(liquor.limits.pressure?.max, liquor.limits.temperature.max),
    unit: 'K',
  };
}

// ---------------------------------------------------------------------------------------------
// U as a function of an effect's state, for the evaporator models
// ---------------------------------------------------------------------------------------------

/** The state of one evaporator effect at which its U is estimated (SI). */
export interface EffectHeatTransferState {
  /** Mass fraction of the liquor in the effect (the liquor leaving it). */
  massFraction: number;
  /** Boiling temperature of the liquor (BPR included; mid-depth with a liquid head), K. */
  boilingTemperature: number;
  /** Pressure where the liquor boils, Pa. */
  bodyPressure: number;
  /** Condensing temperature of the heating steam or vapour, K. */
  condensingTemperature: number;
}

/** U of an effect as a function of its state: the estimate with its breakdown. */
export type OverallCoefficientProvider = (state: EffectHeatTransferState) => OverallCoefficientResult;

/** The estimate's inputs that do not come from the effect's state. */
export type OverallCoefficientEstimateSpec = Pick<
  OverallCoefficientInput,
  'evaporatorType' | 'tube' | 'flow' | 'fouling' | 'liquorProperties'
>;

/**
 * A {@link OverallCoefficientProvider} for an evaporator effect: {@link estimateOverallCoefficient}
 * with the liquor state (mass fraction, boiling temperature, body pressure) and the condensing
 * temperature of the effect, the rest from `spec`. Refusals and warnings name the request field
 * that gave the estimate: `field` (e.g. `overallHeatTransferCoefficients[2]`) + `.estimate.` + the
 * estimate's input (`liquorProperties.thermalConductivity`) or the state quantity
 * (`boilingTemperature`, `massFraction`, `steamTemperature`); the message is led by `label`
 * (e.g. "effect 3").
 */
export function overallCoefficientProvider(
  liquor: LiquorModel,
  spec: OverallCoefficientEstimateSpec,
  field: string,
  label?: string,
): OverallCoefficientProvider {
  // The liquor models call the boiling temperature "temperature".
  const rename = (f: string): string => `${field}.estimate.${f === 'temperature' ? 'boilingTemperature' : f}`;
  const lead = (m: string): string => (label ? `${label}: ${m}` : m);
  return (state) => {
    let result: OverallCoefficientResult;
    try {
      result = estimateOverallCoefficient({
        ...spec,
        liquor,
        massFraction: state.massFraction,
        boilingTemperature: state.boilingTemperature,
        bodyPressure: state.bodyPressure,
        steamTemperature: state.condensingTemperature,
      });
    } catch (err) {
      if (err instanceof EngineRangeError) {
        throw new EngineRangeError(
          rename(err.field),
          err.value,
          err.validRange,
          lead(err.message),
          err.context ?? label,
          err.reason,
        );
      }
      if (err instanceof EngineInputError) throw new EngineInputError(rename(err.field), lead(err.message));
      throw err;
    }
    result.warnings = result.warnings.map((w) => ({
      ...w,
      ...(w.field !== undefined ? { field: rename(w.field) } : {}),
      ...(label ? { message: lead(w.message), context: w.context ?? label } : {}),
    }));
    return result;
  };
}
