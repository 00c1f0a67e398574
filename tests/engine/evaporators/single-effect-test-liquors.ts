/**
 * Test-local liquor models for the single-effect tests. They are NOT reference data: each one
 * encodes the property assumptions a textbook example states, so the engine can be checked
 * against that book's worked answer.
 */
import type { LiquorModel } from '../../../server/engine/liquors/model.js';
import { saturationTemperature } from '../../../server/engine/steam/if97.js';
import type { EngineCaution } from '../../../server/engine/types.js';

export interface TestLiquorOptions {
  id: string;
  /** BPR(x, p), K */
  bpr: (x: number, p: number) => number;
  /** h(x, T), J/kg */
  enthalpy: (x: number, t: number) => number;
  density?: (x: number, t: number) => number;
  solubilityLimit?: (t: number) => number;
  cautions?: EngineCaution[];
  maxMassFraction?: number;
}

export function testLiquor(o: TestLiquorOptions): LiquorModel {
  const box = {
    massFraction: { min: 0, max: o.maxMassFraction ?? 0.9 },
    temperature: { min: 273.15, max: 623.15 },
  };
  const model: LiquorModel = {
    id: o.id,
    name: o.id,
    kind: 'custom',
    compositionVariable: 'mass fraction of solute',
    validity: box,
    limits: box,
    sources: [{ key: `test-${o.id}`, reference: `test-local liquor ${o.id}` }],
    cautions: o.cautions ?? [],
    boilingPoint: (x, p) => saturationTemperature(p) + o.bpr(x, p),
    boilingPointRise: (x, p) => o.bpr(x, p),
    enthalpy: (x, t) => o.enthalpy(x, t),
  };
  if (o.density) model.density = o.density;
  if (o.solubilityLimit) model.solubilityLimit = o.solubilityLimit;
  return model;
}

/**
 * A liquor that boils at a fixed rise over water, as a user reads it from a Dühring chart for
 * one product concentration, and whose enthalpies are given as overrides. Used to check the
 * engine's chain with a book's own chart readings.
 */
export function chartReadingLiquor(id: string, bpr: number, cautions: EngineCaution[] = []): LiquorModel {
  return testLiquor({
    id,
    bpr: () => bpr,
    enthalpy: () => {
      throw new Error('enthalpies come from the overrides in this test');
    },
    cautions,
  });
}

/**
 * A liquor for invariant tests (balances, inversion, directions): the BPR of seawater by
 * Sharqawy, Lienhard and Zubair, Desalination and Water Treatment 16 (2010), eq. for BPR with
 * the coefficients in /work/shared/domain.md §3, S = 1000·x g/kg, t in °C; enthalpy a simple
 * invented mixing rule (1 − x)·4180·(T − 273.16) + x·1500·(T − 273.16) J/kg with a density
 * 1000 + 700·x kg/m³ (invented, for shape only; no value of it is asserted as a reference).
 */
export const invariantLiquor: LiquorModel = testLiquor({
  id: 'invariant-brine',
  bpr: (x, p) => {
    const s = 1000 * x;
    const t = saturationTemperature(p) - 273.15;
    const a = (-4.584e-4 * t * t + 2.823e-1 * t + 17.95) * 1e-6;
    const b = (1.536e-4 * t * t + 5.267e-2 * t + 6.56) * 1e-3;
    return a * s * s + b * s;
  },
  enthalpy: (x, t) => ((1 - x) * 4180 + x * 1500) * (t - 273.16),
  density: (x) => 1000 + 700 * x,
  solubilityLimit: () => 0.26,
  maxMassFraction: 0.3,
});
