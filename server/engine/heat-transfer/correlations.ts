/**
 * Film coefficients and wall resistances of evaporator tubes, each correlation its own function
 * with plain SI numbers (W/(m²·K), m, kg/m³, Pa·s, W/(m·K), J/(kg·K), J/kg, K, W/m²).
 *
 * The liquor boils (or is heated) inside the tubes; the heating steam condenses outside them.
 * Every resistance is referred to the OUTSIDE area of the tube (see overall.ts).
 *
 * Values recalled from the printed sources rather than read from them are marked "from memory"
 * in the Source lines; the @example values were computed with this code.
 */
import { STANDARD_GRAVITY } from '../types.js';

// ---------------------------------------------------------------------------------------------
// Falling film: Chun & Seban (1971)
// ---------------------------------------------------------------------------------------------

/** Citation of the falling-film correlation. */
export const CHUN_SEBAN_SOURCE =
  'K. R. Chun and R. A. Seban, "Heat transfer to evaporating liquid films", J. Heat Transfer 93 (1971) 391–396';

/**
 * Film Reynolds number of a falling film, Re = 4Γ/μ, where Γ is the liquid mass flow per unit
 * wetted perimeter (kg/(m·s)); the definition Chun & Seban (1971) use.
 *
 * Validity: any Γ ≥ 0, μ > 0.
 * Source: Chun & Seban (1971), as defined there.
 *
 * @param wettingRate Γ, kg/(m·s)
 * @param viscosity μ, Pa·s
 * @returns Re = 4Γ/μ, dimensionless
 * @example fallingFilmReynolds(0.3, 4e-4) // → 3000
 */
export function fallingFilmReynolds(wettingRate: number, viscosity: number): number {
  return (4 * wettingRate) / viscosity;
}

/**
 * Transition Reynolds number of an evaporating falling film from wavy-laminar to turbulent flow:
 * Re_t = 5800·Pr^−1.06 (the intersection of the two branches of Chun & Seban).
 *
 * Validity: water films, Pr ≈ 1.8–5.7 (their data; from memory).
 * Source: Chun & Seban (1971), J. Heat Transfer 93, 391–396, eq. for Re_t (from memory).
 *
 * @param prandtl Pr of the liquid, dimensionless
 * @returns Re_t, dimensionless
 * @example chunSebanTransitionReynolds(2) // ≈ 2781.9
 */
export function chunSebanTransitionReynolds(prandtl: number): number {
  return 5800 * prandtl ** -1.06;
}

/**
 * Dimensionless film coefficient of an evaporating wavy-laminar falling film,
 * h* = h·(ν²/g)^(1/3)/k = 0.822·Re^−0.22, Re = 4Γ/μ.
 *
 * Validity: Re below the transition Re_t = 5800·Pr^−1.06; water films, Re ≈ 320–21 000 and
 * Pr ≈ 1.8–5.7 in their experiments (from memory).
 * Source: Chun & Seban (1971), J. Heat Transfer 93, 391–396 (from memory).
 *
 * @param reynolds Re = 4Γ/μ, dimensionless
 * @returns h* = h·(ν²/g)^(1/3)/k, dimensionless
 * @example chunSebanWavyLaminar(1000) // ≈ 0.1798
 */
export function chunSebanWavyLaminar(reynolds: number): number {
  return 0.822 * reynolds ** -0.22;
}

/**
 * Dimensionless film coefficient of an evaporating turbulent falling film,
 * h* = h·(ν²/g)^(1/3)/k = 3.8×10⁻³·Re^0.4·Pr^0.65, Re = 4Γ/μ.
 *
 * Validity: Re above Re_t = 5800·Pr^−1.06; water films, Re up to ≈ 21 000 and Pr ≈ 1.8–5.7 in
 * their experiments (from memory).
 * Source: Chun & Seban (1971), J. Heat Transfer 93, 391–396 (from memory).
 *
 * @param reynolds Re = 4Γ/μ, dimensionless
 * @param prandtl Pr, dimensionless
 * @returns h*, dimensionless
 * @example chunSebanTurbulent(10000, 2) // ≈ 0.2374
 */
export function chunSebanTurbulent(reynolds: number, prandtl: number): number {
  return 3.8e-3 * reynolds ** 0.4 * prandtl ** 0.65;
}

/**
 * Film coefficient of an evaporating falling film by Chun & Seban (1971): the wavy-laminar branch
 * below Re_t, the turbulent branch above, h = h*·k·(g/ν²)^(1/3), ν = μ/ρ.
 *
 * Validity: as {@link chunSebanWavyLaminar} and {@link chunSebanTurbulent}.
 * Source: Chun & Seban (1971), J. Heat Transfer 93, 391–396 (from memory).
 *
 * @param wettingRate Γ, kg/(m·s) per wetted perimeter
 * @param density ρ, kg/m³
 * @param viscosity μ, Pa·s
 * @param thermalConductivity k, W/(m·K)
 * @param heatCapacity c_p, J/(kg·K)
 * @returns h, W/(m²·K)
 * @example chunSebanCoefficient(0.3, 977.8, 4.04e-4, 0.663, 4190) // ≈ 4380 W/(m²·K)
 */
export function chunSebanCoefficient(
  wettingRate: number,
  density: number,
  viscosity: number,
  thermalConductivity: number,
  heatCapacity: number,
): number {
  const re = fallingFilmReynolds(wettingRate, viscosity);
  const pr = (heatCapacity * viscosity) / thermalConductivity;
  const hStar = re < chunSebanTransitionReynolds(pr) ? chunSebanWavyLaminar(re) : chunSebanTurbulent(re, pr);
  const nu = viscosity / density;
  return hStar * thermalConductivity * Math.cbrt(STANDARD_GRAVITY / (nu * nu));
}

// ---------------------------------------------------------------------------------------------
// Forced convection in tubes: Dittus–Boelter
// ---------------------------------------------------------------------------------------------

export const DITTUS_BOELTER_SOURCE =
  'Dittus–Boelter equation, as printed in F. P. Incropera and D. P. DeWitt, Fundamentals of Heat and Mass Transfer, 6th ed., Wiley (2007), eq. 8.60 (from memory)';

/**
 * Nusselt number of fully developed turbulent flow in a tube being heated (Dittus–Boelter,
 * n = 0.4): Nu_D = 0.023·Re_D^0.8·Pr^0.4, Re_D = ρ·u·D/μ, properties at the bulk temperature.
 *
 * Validity: Re_D ≳ 10 000, 0.6 ≤ Pr ≤ 160, L/D ≳ 10 (as printed with eq. 8.60).
 * Source: Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, 6th ed. (2007), eq. 8.60
 * (from memory).
 *
 * @param reynolds Re_D, dimensionless
 * @param prandtl Pr, dimensionless
 * @returns Nu_D = h·D/k, dimensionless
 * @example dittusBoelterNusselt(50000, 3) // ≈ 205.0
 */
export function dittusBoelterNusselt(reynolds: number, prandtl: number): number {
  return 0.023 * reynolds ** 0.8 * prandtl ** 0.4;
}

// ---------------------------------------------------------------------------------------------
// Nucleate boiling: Mostinski (1963), and the asymptotic addition of Kutateladze (1961)
// ---------------------------------------------------------------------------------------------

export const MOSTINSKI_SOURCE =
  'I. L. Mostinski, "Application of the rule of corresponding states for calculation of heat transfer and critical heat flux", Teploenergetika 4 (1963) 66; reduced-pressure form as printed in J. G. Collier and J. R. Thome, Convective Boiling and Condensation, 3rd ed., Oxford (1994) (from memory)';
export const KUTATELADZE_SOURCE =
  'S. S. Kutateladze, "Boiling heat transfer", Int. J. Heat Mass Transfer 4 (1961) 31–45: asymptotic addition h = (h_c² + h_nb²)^(1/2) (from memory)';

/**
 * Nucleate-boiling coefficient by Mostinski's reduced-pressure correlation:
 * h_nb = 0.00417·p_c^0.69·q^0.7·(1.8·p_r^0.17 + 4·p_r^1.2 + 10·p_r^10), with p_c in kPa, q in W/m²,
 * p_r = p/p_c.
 *
 * Validity: pool boiling of pure fluids, roughly 0.001 < p_r < 0.9 (from memory); for solutions
 * (liquors) an approximation, since it knows no property of the liquid but its critical pressure.
 * Source: Mostinski (1963), as printed in Collier & Thome, Convective Boiling and Condensation,
 * 3rd ed. (1994) (from memory).
 *
 * @param heatFlux q on the boiling surface, W/m²
 * @param pressure p, Pa
 * @param criticalPressure p_c, Pa
 * @returns h_nb, W/(m²·K)
 * @example mostinskiNucleateBoiling(100000, 101325, 22064000) // ≈ 9525 W/(m²·K)
 */
export function mostinskiNucleateBoiling(
  heatFlux: number,
  pressure: number,
  criticalPressure: number,
): number {
  const pr = pressure / criticalPressure;
  const f = 1.8 * pr ** 0.17 + 4 * pr ** 1.2 + 10 * pr ** 10;
  return 0.00417 * (criticalPressure / 1000) ** 0.69 * Math.max(heatFlux, 0) ** 0.7 * f;
}

/**
 * Asymptotic (power-2) addition of a convective and a nucleate-boiling coefficient,
 * h = (h_c² + h_nb²)^(1/2), as proposed by Kutateladze (1961) for flow boiling.
 *
 * Validity: an approximation of flow boiling; no suppression of nucleation by the flow.
 * Source: Kutateladze (1961), Int. J. Heat Mass Transfer 4, 31–45 (from memory).
 *
 * @param convective h_c, W/(m²·K)
 * @param nucleate h_nb, W/(m²·K)
 * @returns h, W/(m²·K)
 * @example kutateladzeAddition(3000, 4000) // → 5000 W/(m²·K)
 */
export function kutateladzeAddition(convective: number, nucleate: number): number {
  return Math.hypot(convective, nucleate);
}

// ---------------------------------------------------------------------------------------------
// Film condensation outside vertical tubes: Nusselt (1916) with Rohsenow's latent heat
// ---------------------------------------------------------------------------------------------

export const NUSSELT_SOURCE =
  'W. Nusselt, "Die Oberflächenkondensation des Wasserdampfes", Z. VDI 60 (1916) 541–546, 569–575; laminar film on a vertical surface with W. M. Rohsenow, "Heat transfer and temperature distribution in laminar film condensation", Trans. ASME 78 (1956) 1645–1648, as printed in Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, 6th ed. (2007), eqs. 10.26 and 10.37 (from memory)';

/**
 * Rohsenow's modified latent heat of a condensate film, h′_fg = h_fg + 0.68·c_p,l·(T_sat − T_s):
 * the latent heat plus the subcooling of the film.
 *
 * Validity: Ja = c_p·ΔT/h_fg ≲ 0.1 (as printed).
 * Source: Rohsenow (1956), Trans. ASME 78, 1645–1648, as printed in Incropera & DeWitt, 6th ed.,
 * eq. 10.26 (from memory).
 *
 * @param latentHeat h_fg at T_sat, J/kg
 * @param heatCapacity c_p of the liquid film, J/(kg·K)
 * @param subcooling T_sat − T_s, K
 * @returns h′_fg, J/kg
 * @example rohsenowLatentHeat(2257000, 4193, 50) // ≈ 2399562 J/kg
 */
export function rohsenowLatentHeat(latentHeat: number, heatCapacity: number, subcooling: number): number {
  return latentHeat + 0.68 * heatCapacity * subcooling;
}

/**
 * Mean coefficient of laminar film condensation on a vertical surface of height L (Nusselt):
 * h = 0.943·[ρ_l(ρ_l − ρ_v)·g·k_l³·h′_fg / (μ_l·L·(T_sat − T_s))]^(1/4).
 * The outside of a vertical tube counts as a vertical surface when the film is thin against D.
 *
 * Validity: laminar wave-free film, Re_δ = 4Γ/μ_l ≤ 30; between 30 and 1800 (wavy laminar) the
 * plain theory underpredicts; above 1800 the film is turbulent (as printed with eq. 10.37).
 * Source: Nusselt (1916), as printed in Incropera & DeWitt, 6th ed., eq. 10.37 (from memory).
 *
 * @param liquidDensity ρ_l, kg/m³
 * @param vaporDensity ρ_v, kg/m³
 * @param thermalConductivity k_l, W/(m·K)
 * @param viscosity μ_l, Pa·s
 * @param latentHeat h′_fg (Rohsenow), J/kg
 * @param height L, m
 * @param subcooling T_sat − T_s, K (> 0)
 * @returns h, W/(m²·K)
 * @example nusseltCondensationCoefficient(960, 0, 0.68, 2.82e-4, 2255000, 0.3, 2) // ≈ 13155 W/(m²·K) (J. P. Holman, Heat Transfer, Example 9-1, ρ_v and the film subcooling neglected: 13 150 W/(m²·°C), from memory)
 */
export function nusseltCondensationCoefficient(
  liquidDensity: number,
  vaporDensity: number,
  thermalConductivity: number,
  viscosity: number,
  latentHeat: number,
  height: number,
  subcooling: number,
): number {
  // h = q/ΔT with q from the one written form of the equation below.
  return (
    nusseltCondensationHeatFlux(
      liquidDensity,
      vaporDensity,
      thermalConductivity,
      viscosity,
      latentHeat,
      height,
      subcooling,
    ) / subcooling
  );
}

/**
 * Heat flux of Nusselt film condensation, q = h·ΔT written without the division by ΔT, so that it
 * is finite (zero) at ΔT = 0: q = 0.943·[ρ_l(ρ_l − ρ_v)·g·k_l³·h′_fg·ΔT³ / (μ_l·L)]^(1/4).
 *
 * Validity: as {@link nusseltCondensationCoefficient}.
 * Source: Nusselt (1916), as printed in Incropera & DeWitt, 6th ed., eq. 10.37 (from memory).
 *
 * @param liquidDensity ρ_l, kg/m³
 * @param vaporDensity ρ_v, kg/m³
 * @param thermalConductivity k_l, W/(m·K)
 * @param viscosity μ_l, Pa·s
 * @param latentHeat h′_fg, J/kg
 * @param height L, m
 * @param subcooling T_sat − T_s, K (≥ 0)
 * @returns q, W/m²
 * @example nusseltCondensationHeatFlux(960, 0, 0.68, 2.82e-4, 2255000, 0.3, 2) // ≈ 26310 W/m²
 */
export function nusseltCondensationHeatFlux(
  liquidDensity: number,
  vaporDensity: number,
  thermalConductivity: number,
  viscosity: number,
  latentHeat: number,
  height: number,
  subcooling: number,
): number {
  const dt = Math.max(subcooling, 0);
  return (
    0.943 *
    ((liquidDensity *
      (liquidDensity - vaporDensity) *
      STANDARD_GRAVITY *
      thermalConductivity ** 3 *
      latentHeat *
      dt ** 3) /
      (viscosity * height)) **
      0.25
  );
}

/**
 * Film Reynolds number of the condensate at the bottom of a vertical surface,
 * Re_δ = 4Γ/μ_l with Γ = q̄·L/h′_fg (condensate per unit perimeter), i.e. Re_δ = 4·q̄·L/(μ_l·h′_fg).
 *
 * Validity: laminar wave-free ≤ 30, wavy laminar 30–1800, turbulent > 1800 (as printed).
 * Source: Incropera & DeWitt, 6th ed., eq. 10.35 and Fig. 10.9 (from memory).
 *
 * @param heatFlux q̄ over the surface, W/m²
 * @param height L, m
 * @param viscosity μ_l, Pa·s
 * @param latentHeat h′_fg, J/kg
 * @returns Re_δ, dimensionless
 * @example condensateFilmReynolds(26300, 0.3, 2.82e-4, 2255000) // ≈ 49.63
 */
export function condensateFilmReynolds(
  heatFlux: number,
  height: number,
  viscosity: number,
  latentHeat: number,
): number {
  return (4 * heatFlux * height) / (viscosity * latentHeat);
}

// ---------------------------------------------------------------------------------------------
// Tube wall
// ---------------------------------------------------------------------------------------------

/**
 * Conduction resistance of a tube wall referred to its outside area,
 * R_w = D_o·ln(D_o/D_i)/(2·k_w) (the cylindrical wall; Fourier's law in radial form).
 *
 * Validity: steady radial conduction, D_o > D_i > 0.
 * Source: Incropera & DeWitt, 6th ed., eq. 3.28 (R = ln(r_o/r_i)/(2πLk)) multiplied by the outside
 * area πD_oL (from memory).
 *
 * @param outsideDiameter D_o, m
 * @param insideDiameter D_i, m
 * @param wallConductivity k_w, W/(m·K)
 * @returns R_w, m²·K/W
 * @example cylindricalWallResistance(0.0508, 0.0476, 16.2) // ≈ 1.0201e-4 m²·K/W
 */
export function cylindricalWallResistance(
  outsideDiameter: number,
  insideDiameter: number,
  wallConductivity: number,
): number {
  return (outsideDiameter * Math.log(outsideDiameter / insideDiameter)) / (2 * wallConductivity);
}
