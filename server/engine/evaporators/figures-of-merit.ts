/**
 * Desalination figures of merit of an evaporator (single effect, multiple effect with or without
 * a thermocompressor, mechanical vapour recompression): gain output ratio, performance ratio,
 * specific heat-transfer area and specific thermal and electric energy.
 *
 * Pure: SI numbers in and out. Definitions (H.T. El-Dessouky, H.M. Ettouney, Fundamentals of Salt
 * Water Desalination, Elsevier (2002), the performance parameters of the thermal processes):
 * - gain output ratio GOR = M_d / M_s: kg distillate per kg heating steam; with a thermocompressor
 *   M_s is the motive steam (the steam bought), not the ejector's discharge.
 * - performance ratio PR = M_d / (Q_in / 2326 kJ/kg): kg distillate per 2326 kJ (1000 Btu) of
 *   heat input Q_in = M_s·q_s, q_s the heat the steam releases per kg (its enthalpy less that of
 *   its condensate). With a thermocompressor the heat input is the motive steam's.
 * - specific heat-transfer area sA = A_total / M_d, m² per kg/s of distillate.
 * - specific thermal energy Q_in / V_d and specific electric energy P_el / V_d, V_d = M_d/ρ with
 *   ρ = 1000 kg/m³ (the usual convention; J/m³ here, kWh/m³ at the API's edge).
 * Mechanical vapour recompression with no make-up steam has no heat input: GOR and PR are null
 * and a warning says why.
 */
import { addWarning, type WarningSink } from '../types.js';

/** 2326 kJ/kg (1000 Btu/lb), the heat unit of the performance ratio, J/kg. */
export const PERFORMANCE_RATIO_HEAT = 2326e3;
/** Density taken for distillate volumes, kg/m³ (the usual convention). */
export const DISTILLATE_DENSITY = 1000;

export interface FiguresOfMeritInput {
  /** Distillate M_d, kg/s (the figures per unit of distillate are null when it is 0). */
  distillateFlow: number;
  /** Heating (or motive) steam M_s, kg/s; 0 or absent when there is none (MVR without make-up). */
  heatingSteamFlow?: number;
  /** Heat released per kg of heating steam q_s, J/kg. */
  heatPerKgSteam?: number;
  /** Electric power drawn (compressor of an MVR), W; absent when not modelled. */
  electricPower?: number;
  /** Total heat-transfer area, m². */
  totalArea: number;
}

export interface FiguresOfMerit {
  /** M_d/M_s, or null without heating steam. */
  gainOutputRatio: number | null;
  /** M_d·2326 kJ/kg / Q_in, or null without heat input. */
  performanceRatio: number | null;
  /** A/M_d, m²/(kg/s); null without distillate. */
  specificHeatTransferArea: number | null;
  /** Q_in/(M_d/ρ), J/m³ (0 without heat input); null without distillate. */
  specificThermalEnergy: number | null;
  /** P_el/(M_d/ρ), J/m³, or null when no power is given (or no distillate). */
  specificElectricEnergy: number | null;
  /** Q_in = M_s·q_s, W. */
  heatInput: number;
}

/**
 * Gain output ratio: GOR = M_d / M_s (El-Dessouky and Ettouney 2002).
 *
 * @param distillateFlow M_d, kg/s
 * @param steamFlow M_s, kg/s
 * @returns kg/kg
 * @example gainOutputRatio(8, 1) // ≈ 8
 */
export function gainOutputRatio(distillateFlow: number, steamFlow: number): number {
  return distillateFlow / steamFlow;
}

/**
 * Performance ratio: PR = M_d·2326 kJ/kg / Q_in (El-Dessouky and Ettouney 2002).
 *
 * @param distillateFlow M_d, kg/s
 * @param heatInput Q_in, W
 * @returns kg distillate per 2326 kJ
 * @example performanceRatio(1, 2326000) // ≈ 1
 */
export function performanceRatio(distillateFlow: number, heatInput: number): number {
  return (distillateFlow * PERFORMANCE_RATIO_HEAT) / heatInput;
}

/**
 * Energy per volume of distillate: E = P / (M_d/ρ), ρ = 1000 kg/m³.
 *
 * @param power W
 * @param distillateFlow M_d, kg/s
 * @returns J/m³
 * @example energyPerDistillateVolume(3600000, 1) // ≈ 3600000000 J/m³ (1000 kWh/m³)
 */
export function energyPerDistillateVolume(power: number, distillateFlow: number): number {
  return power / (distillateFlow / DISTILLATE_DENSITY);
}

/** The figures of merit of one evaporator (see the module comment for the definitions). */
export function figuresOfMerit(input: FiguresOfMeritInput, warnings?: WarningSink): FiguresOfMerit {
  const md = input.distillateFlow;
  const ms = input.heatingSteamFlow ?? 0;
  const heatInput = ms > 0 ? ms * (input.heatPerKgSteam ?? 0) : 0;
  if (!(ms > 0) || !(heatInput > 0)) {
    addWarning(warnings, {
      code: 'no-heating-steam',
      field: 'figuresOfMerit',
      message:
        'No heating steam is supplied, so the gain output ratio and the performance ratio (distillate per unit of steam or heat) are undefined: null',
    });
  }
  // per unit of distillate: undefined when nothing is distilled (never an infinity)
  const perDistillate = md > 0;
  return {
    gainOutputRatio: ms > 0 ? gainOutputRatio(md, ms) : null,
    performanceRatio: heatInput > 0 ? performanceRatio(md, heatInput) : null,
    specificHeatTransferArea: perDistillate ? input.totalArea / md : null,
    specificThermalEnergy: !perDistillate
      ? null
      : heatInput > 0
        ? energyPerDistillateVolume(heatInput, md)
        : 0,
    specificElectricEnergy:
      perDistillate && input.electricPower !== undefined
        ? energyPerDistillateVolume(input.electricPower, md)
        : null,
    heatInput,
  };
}
