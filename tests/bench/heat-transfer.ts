/**
 * Benchmark: median time of one overall-coefficient estimate (falling film of water, 50.8 × 1.6 mm
 * 316 tubes 8 m long, boiling at 60 °C, steam at 70 °C, TEMA fouling defaults). Target: median
 * ≤ 20 µs. Two liquors: the pure-water test liquor (all four properties from IAPWS, one
 * evaluation shared by the four) and seawater with viscosity and conductivity given in the
 * request (density and heat capacity from the model). And a six-effect sugar-juice train (sucrose,
 * forward feed, 15 → 65 Bx, falling films in 50.8 × 1.6 mm 304 tubes 8 m long at Γ = 1 kg/(m·s))
 * with U estimated in every effect at its state, re-evaluated each iteration: target median
 * ≤ 5 ms per train. Run alone with `npx tsx tests/bench/heat-transfer.ts`.
 */
import { pathToFileURL } from 'node:url';
import {
  estimateOverallCoefficient,
  type OverallCoefficientInput,
} from '../../server/engine/heat-transfer/overall.js';
import { designMultipleEffect } from '../../server/engine/evaporators/multiple-effect.js';
import { overallCoefficientProvider } from '../../server/engine/heat-transfer/overall.js';
import { seawater } from '../../server/engine/liquors/seawater.js';
import { sucrose } from '../../server/engine/liquors/sucrose.js';
import { saturationPressure } from '../../server/engine/steam/if97.js';
import { waterLiquor } from '../engine/heat-transfer/water-liquor.js';

function median(input: OverallCoefficientInput): { median: number; p90: number; sink: number } {
  let sink = 0;
  for (let i = 0; i < 5000; i++) sink += estimateOverallCoefficient(input).overallHeatTransferCoefficient;
  const times: number[] = [];
  for (let b = 0; b < 200; b++) {
    const t0 = process.hrtime.bigint();
    for (let i = 0; i < 100; i++) sink += estimateOverallCoefficient(input).overallHeatTransferCoefficient;
    times.push(Number(process.hrtime.bigint() - t0) / 1e3 / 100);
  }
  times.sort((a, b) => a - b);
  return {
    median: times[Math.floor(times.length / 2)] ?? NaN,
    p90: times[Math.floor(times.length * 0.9)] ?? NaN,
    sink,
  };
}

export async function runHeatTransferBench(): Promise<void> {
  const base: OverallCoefficientInput = {
    evaporatorType: 'falling-film',
    liquor: waterLiquor,
    massFraction: 0,
    boilingTemperature: 333.15,
    bodyPressure: saturationPressure(333.15),
    steamTemperature: 343.15,
    tube: { outsideDiameter: 0.0508, wallThickness: 0.0016, length: 8, material: 'stainless-316' },
    flow: { wettingRate: 0.5, evaporatedFraction: 0.3 },
  };
  const cases: [string, OverallCoefficientInput][] = [
    ['falling film, water test liquor', base],
    [
      'falling film, seawater with μ and k given',
      {
        ...base,
        liquor: seawater,
        massFraction: 0.05,
        liquorProperties: { viscosity: 4.5e-4, thermalConductivity: 0.65 },
      },
    ],
    [
      'natural circulation, water test liquor',
      { ...base, evaporatorType: 'natural-circulation', flow: { circulationVelocity: 0.8 } },
    ],
  ];
  for (const [label, input] of cases) {
    const m = median(input);
    console.log(
      `overall coefficient (${label}): median ${m.median.toFixed(2)} µs/estimate, p90 ${m.p90.toFixed(2)} µs ` +
        `(target ≤ 20 µs)` +
        (m.sink > 0 ? '' : ' [no result]'),
    );
  }
  const train = estimatedTrainMedian();
  console.log(
    `six-effect train with estimated U in every effect: median ${train.median.toFixed(2)} ms/train, ` +
      `p90 ${train.p90.toFixed(2)} ms, ${train.iterations} iterations (target ≤ 5 ms)` +
      (train.sink > 0 ? '' : ' [no result]'),
  );
  await Promise.resolve();
}

/** Median time of the six-effect train with an estimated U in each effect, ms. */
function estimatedTrainMedian(): { median: number; p90: number; iterations: number; sink: number } {
  const spec = {
    evaporatorType: 'falling-film' as const,
    tube: { outsideDiameter: 0.0508, wallThickness: 0.0016, length: 8, material: 'stainless-304' },
    flow: { wettingRate: 1 },
  };
  const solve = () =>
    designMultipleEffect({
      liquor: sucrose,
      feed: { massFlow: 20, massFraction: 0.15, temperature: 368.15 },
      productMassFraction: 0.65,
      steam: { pressure: 300_000 },
      lastEffectPressure: 15_000,
      overallHeatTransferCoefficients: Array.from({ length: 6 }, (_, i) =>
        overallCoefficientProvider(sucrose, spec, `overallHeatTransferCoefficients[${i}]`, `effect ${i + 1}`),
      ),
    });
  let sink = 0;
  let iterations = 0;
  for (let i = 0; i < 30; i++) sink += solve().totalArea;
  const times: number[] = [];
  for (let b = 0; b < 100; b++) {
    const t0 = process.hrtime.bigint();
    const r = solve();
    times.push(Number(process.hrtime.bigint() - t0) / 1e6);
    sink += r.totalArea;
    iterations = r.iterations;
  }
  times.sort((a, b) => a - b);
  return {
    median: times[Math.floor(times.length / 2)] ?? NaN,
    p90: times[Math.floor(times.length * 0.9)] ?? NaN,
    iterations,
    sink,
  };
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  await runHeatTransferBench();
}
