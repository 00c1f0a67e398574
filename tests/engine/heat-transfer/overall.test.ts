import { describe, expect, it } from 'vitest';
import { EngineInputError } from '../../../server/engine/errors.js';
import {
  estimateOverallCoefficient,
  liquorBoilingState,
  MAX_FALLING_FILM_HEAT_FLUX,
  MIN_WETTING_RATE,
  type OverallCoefficientInput,
} from '../../../server/engine/heat-transfer/overall.js';
import { sodiumHydroxide } from '../../../server/engine/liquors/sodium-hydroxide.js';
import { saturationPressure } from '../../../server/engine/steam/if97.js';
import type { EngineWarning } from '../../../server/engine/types.js';
import { expectRangeError } from '../expect-range-error.js';
import { waterLiquor } from './water-liquor.js';

const fallingFilm: OverallCoefficientInput = {
  evaporatorType: 'falling-film',
  liquor: waterLiquor,
  massFraction: 0,
  boilingTemperature: 333.15,
  bodyPressure: saturationPressure(333.15),
  steamTemperature: 343.15,
  tube: { outsideDiameter: 0.0508, wallThickness: 0.0016, length: 8, material: 'stainless-316' },
  flow: { wettingRate: 0.5, evaporatedFraction: 0.3 },
};

function codes(warnings: EngineWarning[]): string[] {
  return warnings.map((w) => w.code);
}

describe('overall coefficient: the resistances in series', () => {
  for (const [type, flow] of [
    ['falling-film', { wettingRate: 0.5 }],
    ['forced-circulation', { tubeVelocity: 2 }],
    ['natural-circulation', { circulationVelocity: 0.8 }],
  ] as const) {
    it(`passes the same heat flux through every resistance to 1e-9 (${type})`, () => {
      const r = estimateOverallCoefficient({ ...fallingFilm, evaporatorType: type, flow });
      const q = r.heatFlux;
      const ratio = 0.0508 / r.insideDiameter;
      const c = r.condensingSide;
      const flows = [
        c.filmCoefficient * (c.steamTemperature - c.surfaceTemperature),
        (c.surfaceTemperature - r.wall.outsideTemperature) / r.fouling.outside.resistance,
        (r.wall.outsideTemperature - r.wall.insideTemperature) / r.wall.resistance,
        (r.wall.insideTemperature - r.boilingSide.surfaceTemperature) / r.fouling.inside.referredResistance,
        // The boiling side carries q·D_o/D_i on the inside area.
        (r.boilingSide.filmCoefficient *
          (r.boilingSide.surfaceTemperature - r.boilingSide.liquorTemperature)) /
          ratio,
      ];
      for (const f of flows) expect(Math.abs(f / q - 1)).toBeLessThan(1e-9);
      // 1/U_o = Σ R on the outside area, and the shares add to one.
      expect(Math.abs(r.overallHeatTransferCoefficient * r.totalResistance - 1)).toBeLessThan(1e-9);
      const shares =
        c.share + r.wall.share + r.fouling.inside.share + r.fouling.outside.share + r.boilingSide.share;
      expect(shares).toBeCloseTo(1, 12);
      expect(r.boilingSide.heatFlux / q).toBeCloseTo(ratio, 12);
    });
  }

  it('refers the inside fouling and film to the outside area by D_o/D_i', () => {
    const r = estimateOverallCoefficient({ ...fallingFilm, fouling: { inside: 2e-4, outside: 1e-4 } });
    const ratio = 0.0508 / 0.0476;
    expect(r.fouling.inside.referredResistance).toBeCloseTo(2e-4 * ratio, 15);
    expect(r.boilingSide.resistance).toBeCloseTo(ratio / r.boilingSide.filmCoefficient, 15);
    // R_wall = D_o ln(D_o/D_i)/(2 k_w), 316 at 13.4 W/(m·K) (Incropera Table A.1, from memory).
    expect(r.wall.resistance).toBeCloseTo((0.0508 * Math.log(ratio)) / (2 * 13.4), 15);
    expect(r.fouling.inside.defaulted).toBe(false);
  });

  it('marks TEMA fouling defaults when none is given', () => {
    const r = estimateOverallCoefficient(fallingFilm);
    expect(r.fouling.inside.defaulted).toBe(true);
    expect(r.fouling.outside.defaulted).toBe(true);
    expect(r.sources.map((s) => s.key)).toContain('tema-fouling');
  });
});

describe('overall coefficient: plausibility against handbook ranges', () => {
  it('puts a clean falling film of water in the 1 500–3 000 W/(m²·K) of falling-film evaporators', () => {
    // Falling-film evaporators on water-like liquors: U ≈ 1 500–3 000 W/(m²·K) (common practice,
    // from memory). Clean tubes; 50.8 × 1.6 mm 316 stainless, 8 m, boiling at 60 °C, ΔT = 10 K.
    const r = estimateOverallCoefficient({ ...fallingFilm, fouling: { inside: 0, outside: 0 } });
    expect(r.overallHeatTransferCoefficient).toBeGreaterThan(1500);
    expect(r.overallHeatTransferCoefficient).toBeLessThan(3000);
    expect(r.boilingSide.regime).toBe('turbulent');
  });

  it('lowers U by the typical TEMA fouling and stays above 1 000 W/(m²·K)', () => {
    const clean = estimateOverallCoefficient({ ...fallingFilm, fouling: { inside: 0, outside: 0 } });
    const fouled = estimateOverallCoefficient(fallingFilm);
    expect(fouled.overallHeatTransferCoefficient).toBeLessThan(clean.overallHeatTransferCoefficient);
    // Fouled falling-film service ≈ 1 000–2 500 W/(m²·K) (common practice, from memory).
    expect(fouled.overallHeatTransferCoefficient).toBeGreaterThan(1000);
  });

  it('takes the film Reynolds number at the mean of inlet and outlet flow', () => {
    const r = estimateOverallCoefficient(fallingFilm);
    expect(r.boilingSide.wettingRate).toEqual({ inlet: 0.5, mean: 0.5 * 0.85, outlet: 0.5 * 0.7 });
    expect(r.boilingSide.reynolds).toBeCloseTo((4 * 0.425) / r.boilingSide.properties.viscosity, 9);
  });

  it('turns a flow per tube into a wetting rate on the inside perimeter', () => {
    const perTube = 0.5 * Math.PI * 0.0476;
    const a = estimateOverallCoefficient({ ...fallingFilm, flow: { liquorFlowPerTube: perTube } });
    const b = estimateOverallCoefficient({ ...fallingFilm, flow: { wettingRate: 0.5 } });
    expect(a.overallHeatTransferCoefficient).toBeCloseTo(b.overallHeatTransferCoefficient, 9);
  });
});

describe('overall coefficient: warnings', () => {
  it('warns below the minimum wetting rate of a stable film', () => {
    const r = estimateOverallCoefficient({
      ...fallingFilm,
      flow: { wettingRate: 0.06, evaporatedFraction: 0.5 },
    });
    const w = r.warnings.find((x) => x.code === 'wetting-rate-below-minimum')!;
    expect(w.field).toBe('flow.wettingRate');
    expect(w.values?.outlet?.value).toBeCloseTo(0.03, 12);
    expect(w.values?.minimum?.value).toBe(MIN_WETTING_RATE);
  });

  it('warns of a heat flux that risks nucleate boiling in a falling film', () => {
    const r = estimateOverallCoefficient({
      ...fallingFilm,
      steamTemperature: 373.15,
      fouling: { inside: 0, outside: 0 },
      tube: { ...fallingFilm.tube, length: 2, material: 'copper-nickel-90-10' },
    });
    expect(r.boilingSide.heatFlux).toBeGreaterThan(MAX_FALLING_FILM_HEAT_FLUX);
    expect(codes(r.warnings)).toContain('falling-film-heat-flux-high');
  });

  it('warns when the condensate film is wavy or turbulent at the tube bottom', () => {
    const r = estimateOverallCoefficient(fallingFilm);
    expect(r.condensingSide.reynolds).toBeGreaterThan(30);
    expect(codes(r.warnings)).toContain('condensate-film-wavy');
    const short = estimateOverallCoefficient({
      ...fallingFilm,
      tube: { ...fallingFilm.tube, length: 0.05 },
      steamTemperature: 335.15,
    });
    expect(short.condensingSide.regime).toBe('laminar');
    expect(codes(short.warnings)).not.toContain('condensate-film-wavy');
  });

  it('warns when the condensate film turns turbulent (Re_δ > 1800)', () => {
    const r = estimateOverallCoefficient({
      ...fallingFilm,
      evaporatorType: 'forced-circulation',
      flow: { tubeVelocity: 3 },
      boilingTemperature: 373.15,
      bodyPressure: saturationPressure(373.15),
      steamTemperature: 413.15,
      fouling: { inside: 0, outside: 0 },
      tube: { ...fallingFilm.tube, length: 16, material: 'copper-nickel-90-10' },
    });
    expect(r.condensingSide.reynolds).toBeGreaterThan(1800);
    expect(r.condensingSide.regime).toBe('turbulent');
    expect(codes(r.warnings)).toContain('condensate-film-turbulent');
  });

  it('warns when a falling film lies outside the Reynolds range of Chun & Seban’s data', () => {
    const r = estimateOverallCoefficient({ ...fallingFilm, flow: { wettingRate: 0.02 } });
    expect(r.boilingSide.reynolds).toBeLessThan(320);
    expect(codes(r.warnings)).toEqual(
      expect.arrayContaining(['correlation-extrapolated', 'wetting-rate-below-minimum']),
    );
  });

  it('warns that natural circulation is approximate and states the assumed velocity', () => {
    const r = estimateOverallCoefficient({
      ...fallingFilm,
      evaporatorType: 'natural-circulation',
      flow: { circulationVelocity: 0.8 },
    });
    expect(codes(r.warnings)).toContain('natural-circulation-approximate');
    expect(r.assumptions.join(' ')).toContain('0.8 m/s');
    expect(r.boilingSide.nucleateBoilingCoefficient).toBeGreaterThan(0);
    expect(r.boilingSide.filmCoefficient).toBeCloseTo(
      Math.hypot(r.boilingSide.convectiveCoefficient!, r.boilingSide.nucleateBoilingCoefficient!),
      9,
    );
  });

  it('warns outside the Dittus–Boelter range', () => {
    const r = estimateOverallCoefficient({
      ...fallingFilm,
      evaporatorType: 'forced-circulation',
      flow: { tubeVelocity: 0.05 },
    });
    expect(r.boilingSide.reynolds).toBeLessThan(10000);
    expect(codes(r.warnings)).toContain('correlation-extrapolated');
  });

  it('passes on the liquor model’s extrapolation warnings', () => {
    // Olsson et al. (1997): caustic data end at 204 °C (model documentation); at 216 °C the
    // model warns, and the estimate passes the warning on.
    const given = { viscosity: 1e-3, thermalConductivity: 0.6, density: 1300 };
    const r = estimateOverallCoefficient({
      ...fallingFilm,
      liquor: sodiumHydroxide,
      massFraction: 0.3,
      boilingTemperature: 489.15, // 216 °C: above the model's data range, inside its limits
      bodyPressure: 1e6,
      steamTemperature: 500,
      liquorProperties: given,
    });
    expect(codes(r.warnings)).toContain('model-extrapolated');
    expect(r.boilingSide.properties.source.viscosity).toBe('given');
    expect(r.boilingSide.properties.source.heatCapacity).toBe('model');
  });
});

describe('overall coefficient: refusals', () => {
  it('refuses a liquor model without thermal conductivity, naming the property to give', () => {
    // A model as a custom liquor without a conductivity polynomial would be: the rest of NaOH's.
    const noConductivity = {
      ...sodiumHydroxide,
      id: 'custom:no-conductivity',
      thermalConductivity: undefined,
    };
    let caught: unknown;
    try {
      estimateOverallCoefficient({ ...fallingFilm, liquor: noConductivity, massFraction: 0.2 });
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(EngineInputError);
    expect((caught as EngineInputError).field).toBe('liquorProperties.thermalConductivity');
    expect((caught as EngineInputError).message).toMatch(/gives no thermal conductivity/);
  });

  it('estimates a caustic falling film from the NaOH model alone, its conductivity by Riedel’s rule', () => {
    const boilingTemperature = sodiumHydroxide.boilingPoint(0.2, saturationPressure(333.15));
    const r = estimateOverallCoefficient({
      ...fallingFilm,
      liquor: sodiumHydroxide,
      massFraction: 0.2,
      boilingTemperature,
      steamTemperature: 353.15,
    });
    expect(r.boilingSide.properties.source).toEqual({
      density: 'model',
      viscosity: 'model',
      thermalConductivity: 'model',
      heatCapacity: 'model',
    });
    expect(r.boilingSide.properties.thermalConductivity).toBe(
      sodiumHydroxide.thermalConductivity?.(0.2, boilingTemperature),
    );
    // Riedel's box is 10–30 °C and x ≤ 0.10: at 20 % and ≈ 70 °C both are extrapolated, and said so.
    const conductivity = r.warnings.filter((w) => w.property === 'thermal conductivity');
    expect(conductivity.map((w) => w.field).sort()).toEqual(['massFraction', 'temperature']);
    expect(r.sources.map((c) => c.key)).toContain('chun-seban-1971');
  });

  it('refuses steam not hotter than the boiling liquor', () => {
    expectRangeError(() => estimateOverallCoefficient({ ...fallingFilm, steamTemperature: 333.15 }), {
      field: 'steamTemperature',
      validRange: { min: 333.15, max: 623.15, unit: 'K' },
    });
  });

  it('refuses a wall as thick as the radius', () => {
    expectRangeError(
      () =>
        estimateOverallCoefficient({ ...fallingFilm, tube: { ...fallingFilm.tube, wallThickness: 0.0254 } }),
      { field: 'tube.wallThickness', validRange: { min: 0, max: 0.0254, unit: 'm' } },
    );
  });

  it('refuses a falling film without a flow, and a circulation estimate without a velocity', () => {
    expect(() => estimateOverallCoefficient({ ...fallingFilm, flow: {} })).toThrow(EngineInputError);
    expect(() =>
      estimateOverallCoefficient({ ...fallingFilm, evaporatorType: 'forced-circulation', flow: {} }),
    ).toThrow(/tubeVelocity/);
    expect(() =>
      estimateOverallCoefficient({ ...fallingFilm, evaporatorType: 'natural-circulation', flow: {} }),
    ).toThrow(/circulationVelocity/);
  });

  it('refuses a fouling resistance above the range it states (0 to 0.1 m²·K/W)', () => {
    expectRangeError(() => estimateOverallCoefficient({ ...fallingFilm, fouling: { outside: 0.2 } }), {
      field: 'fouling.outside',
      validRange: { min: 0, max: 0.1, unit: 'm²·K/W' },
    });
    expectRangeError(() => estimateOverallCoefficient({ ...fallingFilm, fouling: { inside: -1e-4 } }), {
      field: 'fouling.inside',
      validRange: { min: 0, max: 0.1, unit: 'm²·K/W' },
    });
  });

  it('refuses an evaporated fraction of 1 or more', () => {
    expectRangeError(
      () => estimateOverallCoefficient({ ...fallingFilm, flow: { wettingRate: 0.5, evaporatedFraction: 1 } }),
      { field: 'flow.evaporatedFraction' },
    );
  });
});

describe('liquor boiling state', () => {
  it('finds the body pressure at which the liquor boils at the given temperature', () => {
    const w: EngineWarning[] = [];
    const s = liquorBoilingState(sodiumHydroxide, 0.3, { boilingTemperature: 373.15 }, w);
    expect(sodiumHydroxide.boilingPoint(0.3, s.bodyPressure)).toBeCloseTo(373.15, 9);
    expect(s.bodyPressure).toBeLessThan(saturationPressure(373.15));
  });
});
