import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  compressorStage,
  designMechanicalVaporRecompression,
  mechanicalVaporRecompressionBalances,
  rateMechanicalVaporRecompression,
  stagesNeeded,
  type MechanicalVaporRecompressionInput,
} from '../../server/engine/evaporators/mechanical-vapor-recompression.js';
import { EngineInputError, EngineNoSolutionError } from '../../server/engine/errors.js';
import { createCustomLiquor } from '../../server/engine/liquors/custom.js';
import { sodiumHydroxide } from '../../server/engine/liquors/sodium-hydroxide.js';
import { expectRangeError } from './expect-range-error.js';

/**
 * Hand calculation from IAPWS-IF97's forward equations by python3-iapws, steps stated in
 * tests/fixtures/recompression/generate_mvr_fixture.py (s₁ = s(p₁, h₁), h₂ₛ = h(p₂, s₁),
 * h₂ = h₁ + (h₂ₛ − h₁)/η, W = m·(h₂ − h₁), m_w = m·(h₂ − h_g)/(h_g − h_f), then make-up or surplus).
 */
interface FixtureCase {
  name: string;
  input: {
    F: number;
    xF: number;
    TF: number;
    xL: number;
    pBody: number;
    bpr: number;
    eta: number;
    etaDrive: number;
    heatLossFraction: number;
    suctionPressureDrop: number;
    temperatureDifference: number | null;
    dischargePressure: number | null;
    stages: number | null;
    makeUpPressure: number | null;
  };
  boilingPoint: number;
  evaporation: number;
  vaporEnthalpy: number;
  duty: number;
  suctionPressure: number;
  dischargePressure: number;
  condensingTemperature: number;
  pressureRatio: number;
  stages: number;
  stageDetails: {
    outletPressure: number;
    massFlow: number;
    shaftPower: number;
    desuperheatingWater: number;
    outletTemperature: number;
    isentropicEnthalpy: number;
  }[];
  dischargeTemperature: number;
  shaftPower: number;
  electricPower: number;
  desuperheatingWater: number;
  compressedVaporHeat: number;
  makeUpSteam: number;
  surplusVapor: number;
  saturationTemperatureLift: number;
}
const fixture = JSON.parse(
  readFileSync(new URL('../fixtures/recompression/mvr-iapws.json', import.meta.url), 'utf8'),
) as {
  stage_example: { outletEnthalpy: number; isentropicEnthalpy: number; outletTemperature: number };
  cases: FixtureCase[];
};
const byName = (name: string): FixtureCase => {
  const c = fixture.cases.find((k) => k.name === name);
  if (!c) throw new Error(`no fixture case ${name}`);
  return c;
};

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

/** The fixture's test liquor: constant BPR, c_p(x) = 4180 − 2500·x J/(kg·K) (no published data: a test stand-in). */
function fixtureLiquor(bpr: number) {
  return createCustomLiquor({
    name: 'Dilute test liquor',
    boilingPointRise: { polynomial: [bpr] },
    heatCapacity: { polynomial: [4180, -2500] },
    validity: { massFraction: { min: 0, max: 0.2 } },
  });
}

function inputOf(c: FixtureCase): MechanicalVaporRecompressionInput {
  const i = c.input;
  return {
    liquor: fixtureLiquor(i.bpr),
    feed: { massFlow: i.F, massFraction: i.xF, temperature: i.TF },
    product: { massFraction: i.xL },
    body: {
      pressure: i.pBody,
      overallHeatTransferCoefficient: 2500,
      ...(i.temperatureDifference !== null ? { temperatureDifference: i.temperatureDifference } : {}),
    },
    compressor: {
      isentropicEfficiency: i.eta,
      driveEfficiency: i.etaDrive,
      ...(i.dischargePressure !== null ? { dischargePressure: i.dischargePressure } : {}),
      ...(i.stages !== null ? { stages: i.stages } : {}),
    },
    heatLossFraction: i.heatLossFraction,
    suctionPressureDrop: i.suctionPressureDrop,
    ...(i.makeUpPressure !== null ? { makeUpSteam: { pressure: i.makeUpPressure } } : {}),
  };
}

describe('compressorStage: one isentropic-efficiency compression by IF97 (python3-iapws hand calculation)', () => {
  it('gives the isentropic and actual outlet enthalpies and the discharge temperature', () => {
    const s = compressorStage(30000, 2625000, 42000, 0.75);
    const ref = fixture.stage_example;
    expect(rel(s.isentropicEnthalpy, ref.isentropicEnthalpy)).toBeLessThan(1e-8);
    expect(rel(s.outletEnthalpy, ref.outletEnthalpy)).toBeLessThan(1e-8);
    expect(Math.abs(s.outletTemperature - ref.outletTemperature)).toBeLessThan(1e-5);
  });
});

describe('designMechanicalVaporRecompression against the python3-iapws hand calculation', () => {
  for (const name of ['one-stage-make-up', 'one-stage-surplus', 'three-stages']) {
    describe(name, () => {
      const c = byName(name);
      const r = designMechanicalVaporRecompression(inputOf(c));
      it('takes the vapour at the liquor boiling point and the suction pressure after the drop', () => {
        expect(Math.abs(r.vapor.temperature - c.boilingPoint)).toBeLessThan(1e-6);
        expect(rel(r.vapor.enthalpy, c.vaporEnthalpy)).toBeLessThan(1e-8);
        expect(rel(r.vapor.massFlow, c.evaporation)).toBeLessThan(1e-12);
        expect(r.compressor.suctionPressure).toBeCloseTo(c.suctionPressure, 6);
        expect(rel(r.duty, c.duty)).toBeLessThan(1e-8);
      });
      it('compresses to p_sat(T_boil + ΔT) (or the given discharge) in the stages the ratio needs', () => {
        expect(rel(r.compressor.dischargePressure, c.dischargePressure)).toBeLessThan(1e-7);
        expect(rel(r.compressor.pressureRatio, c.pressureRatio)).toBeLessThan(1e-7);
        expect(r.compressor.stages).toBe(c.stages);
        expect(Math.abs(r.compressor.saturationTemperatureLift - c.saturationTemperatureLift)).toBeLessThan(
          1e-6,
        );
      });
      it('needs the hand-calculated shaft power, discharge temperature and desuperheating water', () => {
        expect(rel(r.compressor.shaftPower, c.shaftPower)).toBeLessThan(1e-7);
        expect(rel(r.compressor.electricPower, c.electricPower)).toBeLessThan(1e-7);
        expect(Math.abs(r.compressor.dischargeTemperature - c.dischargeTemperature)).toBeLessThan(1e-5);
        expect(rel(r.compressor.desuperheatingWater, c.desuperheatingWater)).toBeLessThan(1e-6);
        r.compressor.stageDetails.forEach((s, i) => {
          const ref = c.stageDetails[i]!;
          expect(rel(s.outletPressure, ref.outletPressure)).toBeLessThan(1e-9);
          expect(rel(s.massFlow, ref.massFlow)).toBeLessThan(1e-7);
          expect(rel(s.shaftPower, ref.shaftPower)).toBeLessThan(1e-7);
          expect(Math.abs(s.outletTemperature - ref.outletTemperature)).toBeLessThan(1e-5);
        });
      });
      it('balances the compressed vapour’s heat against the duty with make-up steam or surplus vapour', () => {
        expect(rel(r.compressedVaporHeat, c.compressedVaporHeat)).toBeLessThan(1e-7);
        if (c.makeUpSteam > 0) expect(rel(r.makeUpSteam.massFlow, c.makeUpSteam)).toBeLessThan(1e-6);
        else expect(r.makeUpSteam.massFlow).toBe(0);
        if (c.surplusVapor > 0) expect(rel(r.surplusVapor.massFlow, c.surplusVapor)).toBeLessThan(1e-5);
        else expect(r.surplusVapor.massFlow).toBe(0);
      });
      it('closes the mass, solute and energy balances (compressor work and make-up steam included)', () => {
        expect(r.balances.mass).toBeLessThan(1e-9);
        expect(r.balances.solute).toBeLessThan(1e-9);
        expect(r.balances.energy).toBeLessThan(1e-9);
        // recomputed from the streams, not trusted from the solver
        expect(mechanicalVaporRecompressionBalances(r)).toEqual(r.balances);
      });
    });
  }
});

describe('designMechanicalVaporRecompression: stages', () => {
  const c = byName('three-stages');
  it('splits a pressure ratio of 2.5 at 1.4 per stage into three equal-ratio stages', () => {
    const r = designMechanicalVaporRecompression(inputOf(c));
    expect(r.compressor.stages).toBe(3);
    const ratios = r.compressor.stageDetails.map((s) => s.outletPressure / s.inletPressure);
    for (const x of ratios) expect(x).toBeCloseTo(2.5 ** (1 / 3), 10);
    // later stages compress the vapour plus the water injected before them
    const flows = r.compressor.stageDetails.map((s) => s.massFlow);
    expect(flows[1]!).toBeGreaterThan(flows[0]!);
    expect(flows[2]!).toBeGreaterThan(flows[1]!);
  });
  it('counts ⌈ln r / ln r_max⌉ stages', () => {
    expect(stagesNeeded(2.5, 1.4)).toBe(3); // ln 2.5 / ln 1.4 = 2.72
    expect(stagesNeeded(1.96, 1.4)).toBe(2); // exactly 1.4²
    expect(stagesNeeded(1.2, 1.4)).toBe(1);
  });
  it('warns when the given stages exceed the ratio one stage gives, saying how many it needs', () => {
    const i = inputOf(c);
    const r = designMechanicalVaporRecompression({ ...i, compressor: { ...i.compressor, stages: 1 } });
    expect(r.compressor.stages).toBe(1);
    const w = r.warnings.find((x) => x.code === 'stage-pressure-ratio-above-limit');
    expect(w?.field).toBe('compressor.stages');
    expect(w?.message).toMatch(/needs 3 stages/);
    expect(r.balances.energy).toBeLessThan(1e-9);
  });
});

describe('rateMechanicalVaporRecompression', () => {
  it('finds the ΔT (and so the discharge pressure) a given area needs: the design’s area gives back its ΔT', () => {
    const c = byName('one-stage-make-up');
    const design = designMechanicalVaporRecompression(inputOf(c));
    const i = inputOf(c);
    const rating = rateMechanicalVaporRecompression({
      ...i,
      body: { pressure: i.body.pressure, overallHeatTransferCoefficient: 2500, area: design.area },
    });
    expect(rating.mode).toBe('rating');
    expect(rating.temperatureDifference).toBeCloseTo(5, 9);
    expect(rel(rating.compressor.shaftPower, c.shaftPower)).toBeLessThan(1e-7);
    expect(rating.balances.energy).toBeLessThan(1e-9);
    expect(rating.duty).toBeCloseTo(2500 * design.area * rating.temperatureDifference, 3);
  });
});

describe('warnings and cautions', () => {
  const base = inputOf(byName('one-stage-surplus'));
  it('warns that MVR is uneconomic when the BPR exceeds half the saturation-temperature lift', () => {
    const r = designMechanicalVaporRecompression({
      ...base,
      liquor: fixtureLiquor(8),
      body: { ...base.body, temperatureDifference: 4 },
    });
    const w = r.warnings.find((x) => x.code === 'boiling-point-rise-large-for-recompression');
    expect(w).toBeDefined();
    expect(w?.values?.bpr?.value).toBeCloseTo(8, 9);
    // the small-BPR fixture case carries no such warning
    expect(designMechanicalVaporRecompression(base).warnings.map((x) => x.code)).not.toContain(
      'boiling-point-rise-large-for-recompression',
    );
  });
  it('warns on an isentropic efficiency outside 0.5–0.9 and refuses one outside (0, 1]', () => {
    const low = designMechanicalVaporRecompression({ ...base, compressor: { isentropicEfficiency: 0.45 } });
    expect(low.warnings.map((x) => x.code)).toContain('unusual-isentropic-efficiency');
    for (const eta of [0, -0.1, 1.2, Number.NaN]) {
      expectRangeError(
        () => designMechanicalVaporRecompression({ ...base, compressor: { isentropicEfficiency: eta } }),
        { field: 'compressor.isentropicEfficiency', validRange: { min: 0, max: 1, unit: '1' } },
      );
    }
    expectRangeError(
      () => designMechanicalVaporRecompression({ ...base, compressor: { driveEfficiency: 1.5 } }),
      { field: 'compressor.driveEfficiency' },
    );
  });
  it('cautions about rotating machinery, the hot discharge and the vacuum body, and a caustic liquor’s own hazard', () => {
    const r = designMechanicalVaporRecompression({
      ...base,
      liquor: sodiumHydroxide,
      feed: { massFlow: 2, massFraction: 0.1, temperature: 340 },
      product: { massFraction: 0.15 },
    });
    const codes = r.cautions.map((x) => x.code);
    expect(codes).toEqual(
      expect.arrayContaining(['rotating-machinery', 'hot-compressor-discharge', 'vacuum-equipment']),
    );
    expect(codes.some((x) => /caustic/.test(x))).toBe(true);
  });
});

describe('refusals', () => {
  const base = inputOf(byName('one-stage-surplus'));
  it('refuses two of ΔT, area and discharge pressure, naming them, and refuses none', () => {
    expect(() =>
      designMechanicalVaporRecompression({
        ...base,
        compressor: { dischargePressure: 50e3 },
      }),
    ).toThrow(/body\.temperatureDifference and compressor\.dischargePressure/);
    expect(() =>
      designMechanicalVaporRecompression({
        ...base,
        body: { pressure: 31e3, overallHeatTransferCoefficient: 2500 },
      }),
    ).toThrow(EngineInputError);
  });
  it('refuses a discharge pressure not above the suction pressure', () => {
    const body = { pressure: 31e3, overallHeatTransferCoefficient: 2500 };
    expectRangeError(
      () => designMechanicalVaporRecompression({ ...base, body, compressor: { dischargePressure: 30e3 } }),
      { field: 'compressor.dischargePressure' },
    );
  });
  it('refuses a discharge pressure whose saturation temperature is not above the boiling point', () => {
    // T_sat(31.5 kPa) is above T_sat(31 kPa) but below the boiling point 1.5 K higher
    const body = { pressure: 31e3, overallHeatTransferCoefficient: 2500 };
    expect(() =>
      designMechanicalVaporRecompression({ ...base, body, compressor: { dischargePressure: 31.5e3 } }),
    ).toThrow(EngineNoSolutionError);
  });
  it('refuses stages that are not a whole number from 1 to 10, and a stage ratio not above 1', () => {
    expectRangeError(() => designMechanicalVaporRecompression({ ...base, compressor: { stages: 1.5 } }), {
      field: 'compressor.stages',
    });
    expectRangeError(
      () => designMechanicalVaporRecompression({ ...base, compressor: { maxPressureRatioPerStage: 1 } }),
      { field: 'compressor.maxPressureRatioPerStage' },
    );
  });
  it('refuses make-up steam below the discharge pressure (it could not flow into the chest)', () => {
    const c = byName('one-stage-make-up');
    expectRangeError(
      () => designMechanicalVaporRecompression({ ...inputOf(c), makeUpSteam: { pressure: 35e3 } }),
      { field: 'makeUpSteam.pressure' },
    );
  });
  it('refuses a suction pressure drop that leaves no pressure', () => {
    expectRangeError(() => designMechanicalVaporRecompression({ ...base, suctionPressureDrop: 31e3 }), {
      field: 'suctionPressureDrop',
    });
  });
});

describe('liquid head and the figures other modules read', () => {
  const c = byName('one-stage-make-up');
  it('takes ΔT from the mean boiling point under a liquid head, and the vapour from the surface', () => {
    const i = inputOf(c);
    const flat = designMechanicalVaporRecompression(i);
    const r = designMechanicalVaporRecompression({ ...i, body: { ...i.body, liquidHeight: 2 } });
    expect(r.body.meanBoilingTemperature).toBeGreaterThan(r.product.temperature);
    expect(r.condensingTemperature - r.body.meanBoilingTemperature).toBeCloseTo(5, 9);
    // the vapour leaves at the surface, so it (and the suction) is the same as without head
    expect(r.vapor.temperature).toBeCloseTo(flat.vapor.temperature, 12);
    // the chest must be hotter by the head's rise, so the compressor works harder
    expect(r.compressor.dischargePressure).toBeGreaterThan(flat.compressor.dischargePressure);
    expect(r.compressor.shaftPower).toBeGreaterThan(flat.compressor.shaftPower);
    expect(r.balances.energy).toBeLessThan(1e-9);
  });
  it('carries its headline figures in SI for a scheme study to read', () => {
    const r = designMechanicalVaporRecompression(inputOf(c));
    expect(r.compressor.shaftPower).toBeCloseTo(c.shaftPower, 0); // W
    expect(r.compressor.electricPower).toBeCloseTo(c.electricPower, 0); // W
    expect(r.compressor.stages).toBe(1);
    expect(r.vapor.massFlow).toBeCloseTo(c.evaporation, 12); // kg/s
    expect(r.makeUpSteam.massFlow).toBeCloseTo(c.makeUpSteam, 6); // kg/s
    expect(r.surplusVapor.massFlow).toBe(0);
    expect(r.area).toBeCloseTo(r.duty / (2500 * 5), 9); // m² = Q / (U·ΔT)
    expect(r.specificEnergy).toBeCloseTo(c.electricPower / c.evaporation, 3); // J/kg
  });
});
