/**
 * Benchmark: the evaporator-scheme study over trains of 1–8 effects on an invented caustic duty
 * (12 t/h of 10 % sodium hydroxide at 60 °C to 30 %, backward feed, steam at 9 barg, last effect at
 * 15 kPa, U = 2000 W/(m²·K) in every body). Measured twice: the pure study with the train
 * evaluator (eight equal-area designs, costing, ±30 % sensitivity), and the whole request through
 * the metered route in-process (validation, units, liquor, the study, formatting, metering).
 * Target: median ≤ 50 ms for a study with MVR and TVR candidates on a 2-core machine: the route
 * figure has them (8 trains, 1 MVR, 8 TVR trains); the engine figure is the 8 trains alone.
 * Run alone with `npx tsx tests/bench/scheme-study.ts`.
 */
import { pathToFileURL } from 'node:url';
import request from 'supertest';
import { designMultipleEffect } from '../../server/engine/evaporators/multiple-effect.js';
import { sodiumHydroxide } from '../../server/engine/liquors/sodium-hydroxide.js';
import { runSchemeStudy, type SchemePrices } from '../../server/engine/studies/evaporator-schemes.js';
import { makeHarness } from '../http/helpers.js';

const C = 273.15;
const MAX_EFFECTS = 8;

const prices: SchemePrices = {
  steamPrice: 30,
  electricityPrice: 0.12,
  operatingHoursPerYear: 8000,
  bodyCost: { reference: 250_000, referenceSize: 100, exponent: 0.6 },
  compressorCost: { reference: 900_000, referenceSize: 500e3, exponent: 0.7 },
  interestRate: 0.08,
  lifeYears: 15,
};

function engineStudy() {
  return runSchemeStudy({ maxEffects: MAX_EFFECTS, mvr: false, tvr: false }, prices, {
    train: (n) => {
      const r = designMultipleEffect({
        liquor: sodiumHydroxide,
        feed: { massFlow: 12 / 3.6, massFraction: 0.1, temperature: 60 + C },
        productMassFraction: 0.3,
        steam: { pressure: 1001.325e3 },
        lastEffectPressure: 15e3,
        overallHeatTransferCoefficients: Array.from({ length: n }, () => 2000),
        feedArrangement: 'backward',
      });
      return {
        steamMassFlow: r.steam.massFlow,
        electricPower: 0,
        shaftPower: 0,
        totalArea: r.totalArea,
        bodies: n,
        compressors: 0,
        evaporation: r.evaporation,
        warnings: r.warnings,
      };
    },
  });
}

const body = {
  liquor: 'sodium-hydroxide',
  feed: { massFlow: '12 t/h', massFraction: 0.1, temperature: 60 },
  product: { massFraction: 0.3 },
  lowestPressure: 15,
  steam: { pressure: '9 barg' },
  overallHeatTransferCoefficient: 2000,
  feedArrangement: 'backward',
  maxEffects: MAX_EFFECTS,
  mvr: { temperatureDifference: 8, isentropicEfficiency: 0.75, driveEfficiency: 0.95 },
  tvr: { motivePressure: '25 barg' },
  prices: {
    steamPrice: 30,
    electricityPrice: 0.12,
    operatingHoursPerYear: 8000,
    bodyCost: { reference: 250_000, referenceArea: 100, exponent: 0.6 },
    compressorCost: { reference: 900_000, referenceShaftPower: 500, exponent: 0.7 },
    interestRate: 0.08,
    lifeYears: 15,
  },
};

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 ? (s[m] as number) : ((s[m - 1] as number) + (s[m] as number)) / 2;
}

export async function runSchemeStudyBench(): Promise<void> {
  for (let i = 0; i < 10; i++) engineStudy(); // warm-up (JIT)
  const times: number[] = [];
  const t0 = performance.now();
  while (times.length < 50 || performance.now() - t0 < 1000) {
    const a = performance.now();
    engineStudy();
    times.push(performance.now() - a);
    if (times.length >= 1000) break;
  }
  const med = median(times);
  console.log(
    `scheme study, trains of 1–${MAX_EFFECTS} effects (engine, NaOH, backward feed): median ${med.toFixed(2)} ms per study, ` +
      `${times.length} runs (trains only)`,
  );

  const h = await makeHarness({ quota: 100_000_000, rateLimit: 100_000 });
  const send = () =>
    request(h.app)
      .post('/v1/studies/evaporator-schemes')
      .set('Authorization', `Bearer ${h.token}`)
      .send(body);
  for (let i = 0; i < 5; i++) {
    const res = await send();
    if (res.status !== 200) throw new Error(`the study answered ${res.status}`);
  }
  const http: number[] = [];
  for (let i = 0; i < 40; i++) {
    const a = performance.now();
    await send();
    http.push(performance.now() - a);
  }
  console.log(
    `scheme study with MVR and TVR (8 trains, 1 MVR, 8 TVR trains) through the metered route in-process (supertest): ` +
      `median ${median(http).toFixed(2)} ms per request, ${http.length} requests (target ≤ 50 ms)`,
  );
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  await runSchemeStudyBench();
}
