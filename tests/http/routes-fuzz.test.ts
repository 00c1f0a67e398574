// Fuzz: random and adversarial bodies per route → never a 5xx, and never NaN/Infinity (or the
// null JSON makes of them) in a 2xx body. Property-based with fast-check: a thousand random bodies
// per route and a thousand adversarial JSON shapes per POST route (about 17 000 requests).
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import fc from 'fast-check';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeHarness, type Harness } from './helpers.js';

let h: Harness;
// One listening server for all requests: supertest given the bare app would start and stop a
// server for each of the 14 000, which made this file the heaviest CPU load beside the browser tests.
let server: http.Server;
let origin: string;
beforeAll(async () => {
  h = await makeHarness({ quota: 10_000_000, rateLimit: 100_000 });
  server = http.createServer(h.app);
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  origin = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
});
afterAll(async () => {
  await new Promise<void>((resolve) => server.close(() => resolve()));
});

const weirdNumber = fc.oneof(
  fc.double({ noNaN: false }),
  fc.constantFrom(0, -0, 1e-300, 1e300, -1, 0.999999, 1, 101.325, 22064, 611.2),
);
const quantity = fc.oneof(
  weirdNumber,
  fc.constantFrom(
    '1.4 bar',
    '2 barg',
    '38 degC',
    '4.5 t/h',
    '65 %',
    '60 Bx',
    '-3 K',
    '1e999 kPa',
    'NaN',
    '',
    ' ',
    'bar',
  ),
  fc.string({ maxLength: 12 }),
  fc.constant(null),
  fc.boolean(),
  fc.constant({}),
);
const liquor = fc.oneof(
  fc.constantFrom('sodium-hydroxide', 'sucrose', 'seawater', 'kraft-black-liquor', 'nope', ''),
  fc.record({
    name: fc.string({ minLength: 1, maxLength: 8 }),
    boilingPointRise: fc.record({ polynomial: fc.array(weirdNumber, { minLength: 1, maxLength: 4 }) }),
    heatCapacity: fc.record({ polynomial: fc.array(weirdNumber, { minLength: 1, maxLength: 3 }) }),
  }),
);

/** Figures of merit documented as null where undefined (no heating steam, no electric power, no distillate). */
const NULLABLE_FIGURES = [
  'gainOutputRatio',
  'performanceRatio',
  'specificHeatTransferArea',
  'specificThermalEnergy',
  'specificElectricEnergy',
];

/**
 * NaN/±Infinity, or a null (what JSON makes of them) anywhere but an unbounded end of a validRange,
 * an echoed input `value` or a figure of merit documented as nullable.
 */
function hasNonFiniteOrNull(v: unknown, key = '', parent = ''): boolean {
  if (v === null)
    return !(
      (parent === 'validRange' && (key === 'min' || key === 'max')) ||
      key === 'value' ||
      (parent === 'figuresOfMerit' && NULLABLE_FIGURES.includes(key))
    );
  if (typeof v === 'number') return !Number.isFinite(v);
  if (Array.isArray(v)) return v.some((x) => hasNonFiniteOrNull(x, '', key));
  if (typeof v === 'object')
    return Object.entries(v as object).some(([k, x]) => hasNonFiniteOrNull(x, k, key));
  return false;
}

async function check(method: 'get' | 'post' | 'put', path: string, payload: unknown): Promise<void> {
  const req = request(origin)[method](path).set('Authorization', `Bearer ${h.token}`);
  const res =
    method === 'get' ? await req.query(payload as Record<string, string>) : await req.send(payload as object);
  expect(res.status, JSON.stringify(payload)).toBeLessThan(500);
  if (res.status < 300) expect(hasNonFiniteOrNull(res.body), JSON.stringify(payload)).toBe(false);
}

/** Random bodies per route; each POST route gets as many adversarial shapes again (the last test). */
const RUNS = 1000;

// A thousand requests per test: allow for a busy 2-core CI machine.
describe('fuzzed requests never give a 5xx or a non-finite number', { timeout: 60_000 }, () => {
  it('GET /v1/steam/saturation', async () => {
    await fc.assert(
      fc.asyncProperty(fc.record({ pressure: quantity, temperature: quantity }, { requiredKeys: [] }), (q) =>
        check(
          'get',
          '/v1/steam/saturation',
          Object.fromEntries(Object.entries(q).map(([k, v]) => [k, String(v)])),
        ),
      ),
      { numRuns: RUNS },
    );
  });

  it('POST /v1/steam/state', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.record({ pressure: quantity, temperature: quantity, enthalpy: quantity }, { requiredKeys: [] }),
        (b) => check('post', '/v1/steam/state', b),
      ),
      { numRuns: RUNS },
    );
  });

  it('POST /v1/liquors/{id}/boiling-point and /enthalpy', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom('sodium-hydroxide', 'sucrose', 'seawater', 'kraft-black-liquor'),
        fc.constantFrom('boiling-point', 'enthalpy'),
        fc.record(
          { massFraction: quantity, pressure: quantity, temperature: quantity },
          { requiredKeys: [] },
        ),
        (id, what, b) => {
          const body =
            what === 'enthalpy'
              ? { massFraction: b.massFraction, temperature: b.temperature }
              : { massFraction: b.massFraction, pressure: b.pressure };
          return check('post', `/v1/liquors/${id}/${what}`, body);
        },
      ),
      { numRuns: RUNS * 2 },
    );
  });

  it('POST /v1/evaporators/single-effect', async () => {
    await fc.assert(
      fc.asyncProperty(
        liquor,
        fc.record({ massFlow: quantity, massFraction: quantity, temperature: quantity }),
        fc.record({ massFraction: quantity }, { requiredKeys: [] }),
        fc.record(
          { pressure: quantity, overallHeatTransferCoefficient: quantity, area: quantity },
          { requiredKeys: ['pressure', 'overallHeatTransferCoefficient'] },
        ),
        quantity,
        (l, feed, product, body, steamP) =>
          check('post', '/v1/evaporators/single-effect', {
            liquor: l,
            feed,
            product,
            body,
            steam: { pressure: steamP },
          }),
      ),
      { numRuns: RUNS },
    );
  });

  it('POST /v1/evaporators/single-effect with plausible numbers', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom('sodium-hydroxide', 'sucrose', 'seawater', 'kraft-black-liquor'),
        fc.double({ min: 0.01, max: 50, noNaN: true }),
        fc.double({ min: 0, max: 0.6, noNaN: true }),
        fc.double({ min: 0, max: 0.9, noNaN: true }),
        fc.double({ min: 1, max: 200, noNaN: true }),
        fc.double({ min: 50, max: 2000, noNaN: true }),
        fc.double({ min: 1, max: 150, noNaN: true }),
        fc.option(fc.double({ min: 1, max: 500, noNaN: true })),
        fc.option(fc.boolean()),
        (l, F, xF, xL, p, ps, t, area, fom) =>
          check('post', '/v1/evaporators/single-effect', {
            liquor: l,
            feed: { massFlow: F, massFraction: xF, temperature: t },
            product: area === null ? { massFraction: xL } : {},
            steam: { pressure: ps },
            body: { pressure: p, overallHeatTransferCoefficient: 1500, ...(area === null ? {} : { area }) },
            ...(fom === null ? {} : { figuresOfMerit: fom }),
          }),
      ),
      { numRuns: RUNS },
    );
  });

  it('POST /v1/evaporators/multiple-effect', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom('sodium-hydroxide', 'sucrose', 'seawater', 'nope'),
        fc.integer({ min: 0, max: 11 }),
        fc.oneof(
          fc.constantFrom('forward', 'backward', 'parallel', 'sideways'),
          fc.array(fc.integer({ min: 0, max: 5 }), { maxLength: 5 }),
        ),
        fc.double({ min: 0.1, max: 20, noNaN: true }),
        fc.double({ min: 0.01, max: 0.3, noNaN: true }),
        fc.double({ min: 0.2, max: 0.7, noNaN: true }),
        fc.double({ min: 5, max: 100, noNaN: true }),
        fc.array(fc.oneof(weirdNumber, fc.double({ min: 500, max: 4000, noNaN: true })), { maxLength: 6 }),
        (l, n, arrangement, F, xF, xL, pLast, us) =>
          check('post', '/v1/evaporators/multiple-effect', {
            liquor: l,
            effects: n,
            feedArrangement: arrangement,
            feed: { massFlow: F, massFraction: xF, temperature: 60 },
            product: { massFraction: xL },
            steam: { pressure: '3 barg' },
            lastEffectPressure: pLast,
            overallHeatTransferCoefficients: us.length === n ? us : Array.from({ length: n }, () => 2000),
          }),
      ),
      { numRuns: RUNS },
    );
  });

  it('POST /v1/evaporators/mechanical-vapor-recompression', async () => {
    await fc.assert(
      fc.asyncProperty(
        liquor,
        fc.record({ massFlow: quantity, massFraction: quantity, temperature: quantity }),
        fc.record({ massFraction: quantity }, { requiredKeys: [] }),
        fc.record(
          {
            pressure: quantity,
            overallHeatTransferCoefficient: quantity,
            temperatureDifference: quantity,
            area: quantity,
          },
          { requiredKeys: ['pressure', 'overallHeatTransferCoefficient'] },
        ),
        fc.record(
          {
            isentropicEfficiency: quantity,
            driveEfficiency: quantity,
            dischargePressure: quantity,
            stages: weirdNumber,
            maxPressureRatioPerStage: weirdNumber,
          },
          { requiredKeys: [] },
        ),
        fc.record(
          {
            heatLossFraction: quantity,
            suctionPressureDrop: quantity,
            makeUpSteam: fc.record({ pressure: quantity }),
          },
          { requiredKeys: [] },
        ),
        (l, feed, product, body, compressor, extra) =>
          check('post', '/v1/evaporators/mechanical-vapor-recompression', {
            liquor: l,
            feed,
            product,
            body,
            compressor,
            ...extra,
          }),
      ),
      { numRuns: RUNS },
    );
  });

  it('POST /v1/evaporators/mechanical-vapor-recompression with plausible numbers', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom('sodium-hydroxide', 'sucrose', 'seawater', 'kraft-black-liquor'),
        fc.double({ min: 0.01, max: 50, noNaN: true }),
        fc.double({ min: 0, max: 0.6, noNaN: true }),
        fc.double({ min: 0, max: 0.9, noNaN: true }),
        fc.double({ min: 1, max: 300, noNaN: true }),
        fc.double({ min: 1, max: 150, noNaN: true }),
        fc.oneof(
          fc.record({ temperatureDifference: fc.double({ min: 0.01, max: 80, noNaN: true }) }),
          fc.record({ area: fc.double({ min: 1, max: 5000, noNaN: true }) }),
          fc.record({ dischargePressure: fc.double({ min: 1, max: 2000, noNaN: true }) }),
        ),
        fc.option(fc.integer({ min: 1, max: 10 })),
        fc.double({ min: 0.3, max: 1, noNaN: true }),
        fc.option(fc.double({ min: 1, max: 3000, noNaN: true })),
        (l, F, xF, xL, p, t, lift, stages, eta, makeUp) =>
          check('post', '/v1/evaporators/mechanical-vapor-recompression', {
            liquor: l,
            feed: { massFlow: F, massFraction: xF, temperature: t },
            product: { massFraction: xL },
            body: {
              pressure: p,
              overallHeatTransferCoefficient: 2000,
              ...('dischargePressure' in lift ? {} : lift),
            },
            compressor: {
              isentropicEfficiency: eta,
              ...('dischargePressure' in lift ? lift : {}),
              ...(stages === null ? {} : { stages }),
            },
            ...(makeUp === null ? {} : { makeUpSteam: { pressure: makeUp } }),
          }),
      ),
      { numRuns: RUNS },
    );
  });

  it('POST /v1/studies/evaporator-schemes', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom('sodium-hydroxide', 'sucrose', 'seawater', 'nope'),
        fc.integer({ min: 0, max: 11 }),
        fc.constantFrom('forward', 'backward', 'parallel', 'sideways'),
        fc.double({ min: 0.1, max: 20, noNaN: true }),
        fc.double({ min: 0.01, max: 0.3, noNaN: true }),
        fc.double({ min: 0.2, max: 0.7, noNaN: true }),
        fc.oneof(weirdNumber, fc.double({ min: 5, max: 100, noNaN: true })),
        fc.record({
          steamPrice: weirdNumber,
          electricityPrice: weirdNumber,
          operatingHoursPerYear: fc.oneof(weirdNumber, fc.integer({ min: 0, max: 9000 })),
          bodyCost: fc.record({ reference: weirdNumber, referenceArea: quantity, exponent: weirdNumber }),
          compressorCost: fc.record({
            reference: weirdNumber,
            referenceShaftPower: quantity,
            exponent: weirdNumber,
          }),
          interestRate: weirdNumber,
          lifeYears: weirdNumber,
        }),
        fc.option(
          fc.record({
            temperatureDifference: quantity,
            isentropicEfficiency: quantity,
            driveEfficiency: quantity,
          }),
        ),
        fc.option(fc.record({ motivePressure: quantity })),
        (l, n, arrangement, F, xF, xL, pLast, prices, mvr, tvr) =>
          check('post', '/v1/studies/evaporator-schemes', {
            liquor: l,
            feed: { massFlow: F, massFraction: xF, temperature: 60 },
            product: { massFraction: xL },
            lowestPressure: pLast,
            steam: { pressure: '3 barg' },
            overallHeatTransferCoefficient: 2000,
            feedArrangement: arrangement,
            maxEffects: n,
            prices,
            ...(mvr === null ? {} : { mvr }),
            ...(tvr === null ? {} : { tvr }),
          }),
      ),
      { numRuns: RUNS },
    );
  });

  it('POST /v1/evaporators/multiple-effect with a thermocompressor, flash and figures of merit', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom('sodium-hydroxide', 'sucrose', 'seawater'),
        fc.integer({ min: 1, max: 5 }),
        fc.oneof(quantity, fc.double({ min: 1, max: 5000, noNaN: true })),
        fc.option(fc.oneof(quantity, fc.double({ min: 0, max: 300, noNaN: true }))),
        fc.option(fc.oneof(fc.integer({ min: -1, max: 7 }), quantity)),
        fc.oneof(quantity, fc.double({ min: 20, max: 400, noNaN: true })),
        fc.double({ min: 2, max: 60, noNaN: true }),
        fc.option(fc.oneof(fc.boolean(), quantity)),
        fc.option(fc.oneof(fc.boolean(), quantity)),
        (l, n, pm, superheat, from, chest, pLast, flash, fom) =>
          check('post', '/v1/evaporators/multiple-effect', {
            liquor: l,
            effects: n,
            feed: { massFlow: 10, massFraction: l === 'seawater' ? 0.04 : 0.1, temperature: 40 },
            product: { massFraction: l === 'seawater' ? 0.07 : 0.2 },
            steam: { pressure: chest },
            lastEffectPressure: pLast,
            overallHeatTransferCoefficients: Array.from({ length: n }, () => 2000),
            thermocompressor: {
              motivePressure: pm,
              ...(superheat === null ? {} : { motiveSuperheat: superheat }),
              ...(from === null ? {} : { entrainedFromEffect: from }),
            },
            ...(flash === null ? {} : { condensateFlash: flash }),
            ...(fom === null ? {} : { figuresOfMerit: fom }),
          }),
      ),
      { numRuns: RUNS },
    );
  });

  // U given as { estimate }: hostile estimate parts, then plausible ones through the solvers
  // (single effect design and rating, each train effect, MVR design and rating).
  const estimate = fc.record(
    {
      evaporatorType: fc.constantFrom('falling-film', 'forced-circulation', 'natural-circulation', 'plate'),
      tube: fc.oneof(
        quantity,
        fc.record(
          {
            outsideDiameter: quantity,
            wallThickness: quantity,
            length: quantity,
            material: fc.constantFrom('stainless-316', 'unobtainium'),
            wallConductivity: quantity,
          },
          { requiredKeys: ['outsideDiameter', 'wallThickness', 'length'] },
        ),
      ),
      flow: fc.record(
        { wettingRate: quantity, liquorFlowPerTube: quantity, tubeVelocity: quantity },
        { requiredKeys: [] },
      ),
      fouling: fc.record({ inside: quantity, outside: quantity }, { requiredKeys: [] }),
      liquorProperties: fc.record(
        { viscosity: quantity, thermalConductivity: quantity },
        { requiredKeys: [] },
      ),
    },
    { requiredKeys: ['evaporatorType'] },
  );
  const coefficient = fc.oneof(quantity, fc.record({ estimate }), fc.record({ estimate: quantity }));
  const plausibleEstimate = fc
    .tuple(
      fc.constantFrom('falling-film', 'forced-circulation', 'natural-circulation'),
      fc.double({ min: 0.01, max: 0.1, noNaN: true }),
      fc.double({ min: 0.0005, max: 0.004, noNaN: true }),
      fc.double({ min: 0.5, max: 15, noNaN: true }),
      fc.double({ min: 0.01, max: 3, noNaN: true }),
    )
    .map(([type, d, t, len, v]) => ({
      estimate: {
        evaporatorType: type,
        tube: { outsideDiameter: d, wallThickness: t, length: len, material: 'stainless-316' },
        flow:
          type === 'falling-film'
            ? { wettingRate: v }
            : type === 'forced-circulation'
              ? { tubeVelocity: v }
              : { circulationVelocity: v },
        liquorProperties: { thermalConductivity: 0.6 },
      },
    }));

  it('POST evaporators with U as hostile { estimate } bodies', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom('single-effect', 'multiple-effect', 'mechanical-vapor-recompression'),
        liquor,
        fc.array(coefficient, { minLength: 1, maxLength: 3 }),
        (route, l, us) =>
          check('post', `/v1/evaporators/${route}`, {
            liquor: l,
            feed: { massFlow: 2, massFraction: 0.1, temperature: 60 },
            product: { massFraction: 0.2 },
            ...(route === 'multiple-effect'
              ? {
                  effects: us.length,
                  steam: { pressure: '3 barg' },
                  lastEffectPressure: 15,
                  overallHeatTransferCoefficients: us,
                }
              : {
                  ...(route === 'single-effect' ? { steam: { pressure: '3 barg' } } : {}),
                  body: {
                    pressure: 31,
                    overallHeatTransferCoefficient: us[0],
                    ...(route === 'single-effect' ? {} : { temperatureDifference: 5 }),
                  },
                }),
          }),
      ),
      { numRuns: RUNS / 2 },
    );
  });

  it('POST evaporators with U as plausible { estimate } bodies', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom('single-effect', 'multiple-effect', 'mechanical-vapor-recompression'),
        fc.constantFrom('sodium-hydroxide', 'sucrose', 'seawater', 'kraft-black-liquor'),
        fc.array(plausibleEstimate, { minLength: 1, maxLength: 4 }),
        fc.double({ min: 0.02, max: 0.3, noNaN: true }),
        fc.double({ min: 1.2, max: 4, noNaN: true }),
        fc.option(fc.double({ min: 1, max: 500, noNaN: true })),
        (route, l, us, xF, ratio, area) =>
          check('post', `/v1/evaporators/${route}`, {
            liquor: l,
            feed: { massFlow: 2, massFraction: xF, temperature: 60 },
            product: area === null || route !== 'single-effect' ? { massFraction: xF * ratio } : {},
            ...(route === 'multiple-effect'
              ? {
                  effects: us.length,
                  steam: { pressure: '3 barg' },
                  lastEffectPressure: 15,
                  overallHeatTransferCoefficients: us,
                }
              : {
                  ...(route === 'single-effect' ? { steam: { pressure: '3 barg' } } : {}),
                  body: {
                    pressure: 31,
                    overallHeatTransferCoefficient: us[0],
                    ...(area !== null
                      ? { area }
                      : route === 'single-effect'
                        ? {}
                        : { temperatureDifference: 5 }),
                  },
                }),
          }),
      ),
      { numRuns: RUNS / 2 },
    );
  });

  it('POST /v1/heat-transfer/overall-coefficient', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom('falling-film', 'forced-circulation', 'natural-circulation', 'plate'),
        liquor,
        fc.record(
          {
            outsideDiameter: quantity,
            wallThickness: quantity,
            length: quantity,
            material: fc.constantFrom('stainless-316', 'unobtainium'),
            wallConductivity: quantity,
          },
          { requiredKeys: ['outsideDiameter', 'wallThickness', 'length'] },
        ),
        fc.record(
          {
            wettingRate: quantity,
            liquorFlowPerTube: quantity,
            evaporatedFraction: quantity,
            tubeVelocity: quantity,
            circulationVelocity: quantity,
          },
          { requiredKeys: [] },
        ),
        fc.record(
          { viscosity: quantity, thermalConductivity: quantity, density: quantity, heatCapacity: quantity },
          { requiredKeys: [] },
        ),
        quantity,
        quantity,
        (evaporatorType, l, tube, flow, liquorProperties, p, ts) =>
          check('post', '/v1/heat-transfer/overall-coefficient', {
            evaporatorType,
            liquor: l,
            massFraction: 0.05,
            bodyPressure: p,
            steam: { temperature: ts },
            tube,
            flow,
            liquorProperties,
          }),
      ),
      { numRuns: RUNS },
    );
  });

  it('POST /v1/heat-transfer/overall-coefficient with plausible numbers', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom('falling-film', 'forced-circulation', 'natural-circulation'),
        fc.constantFrom('sodium-hydroxide', 'sucrose', 'seawater', 'kraft-black-liquor'),
        fc.double({ min: 0, max: 0.7, noNaN: true }),
        fc.double({ min: 1, max: 500, noNaN: true }),
        fc.double({ min: 1, max: 300, noNaN: true }),
        fc.double({ min: 0.005, max: 0.2, noNaN: true }),
        fc.double({ min: 0.0002, max: 0.02, noNaN: true }),
        fc.double({ min: 0.1, max: 25, noNaN: true }),
        fc.double({ min: 1e-3, max: 5, noNaN: true }),
        fc.double({ min: 0, max: 0.95, noNaN: true }),
        fc.option(fc.double({ min: 1, max: 250, noNaN: true })),
        (type, l, x, p, ts, d, t, len, v, f, tb) =>
          check('post', '/v1/heat-transfer/overall-coefficient', {
            evaporatorType: type,
            liquor: l,
            massFraction: x,
            ...(tb === null ? { bodyPressure: p } : { boilingTemperature: tb }),
            steam: { temperature: ts },
            tube: { outsideDiameter: d, wallThickness: t, length: len, wallConductivity: 16 },
            flow:
              type === 'falling-film'
                ? { wettingRate: v, evaporatedFraction: f }
                : type === 'forced-circulation'
                  ? { tubeVelocity: v }
                  : { circulationVelocity: v },
            liquorProperties: { viscosity: 1, thermalConductivity: 0.6, density: 1100, heatCapacity: 3.8 },
          }),
      ),
      { numRuns: RUNS },
    );
  });

  it('POST /v1/batch', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom(
          'steam-saturation',
          'steam-state',
          'liquor-boiling-point',
          'liquor-enthalpy',
          'single-effect',
          'mechanical-vapor-recompression',
          'overall-coefficient',
          'bogus',
        ),
        fc.option(liquor),
        fc.array(
          fc.dictionary(
            fc.constantFrom('pressure', 'temperature', 'massFraction', 'enthalpy', 'feed', 'liquor'),
            quantity,
          ),
          { maxLength: 5 },
        ),
        (operation, l, cases) =>
          check('post', '/v1/batch', { operation, ...(l === null ? {} : { liquor: l }), cases }),
      ),
      { numRuns: RUNS },
    );
  });

  it('POST /v1/sweeps', async () => {
    // Varied fields real and hostile, lists and ranges (small, so each run stays quick).
    const field = fc.constantFrom(
      'body.pressure',
      'feed.temperature',
      'pressure',
      'massFraction',
      '__proto__.x',
      'constructor',
      'body.nope',
      'body[0]',
      '',
    );
    const vary = fc.oneof(
      fc.record({ field, values: fc.array(quantity, { maxLength: 3 }) }),
      fc.record({
        field,
        from: fc.double({ noNaN: true }),
        to: fc.double({ noNaN: true }),
        steps: fc.integer({ min: -2, max: 4 }),
        spacing: fc.constantFrom('linear', 'log', 'cubic'),
      }),
    );
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom('steam-saturation', 'liquor-boiling-point', 'single-effect', 'bogus'),
        fc.dictionary(
          fc.constantFrom('pressure', 'temperature', 'massFraction', 'liquor', 'feed', 'body'),
          quantity,
        ),
        fc.array(vary, { maxLength: 3 }),
        (operation, base, v) => check('post', '/v1/sweeps', { operation, base, vary: v }),
      ),
      { numRuns: RUNS },
    );
  });

  it('GET and DELETE /v1/jobs/{jobId}, its result and its CSV with hostile ids and columns', async () => {
    // A real finished job of the account, so its CSV's `columns=` is read rather than 404.
    const accepted = await request(origin)
      .post('/v1/sweeps')
      .set('Authorization', `Bearer ${h.token}`)
      .set('Prefer', 'respond-async')
      .send({
        operation: 'single-effect',
        base: {
          liquor: 'sodium-hydroxide',
          feed: { massFlow: 2, massFraction: 0.1, temperature: 60 },
          product: { massFraction: 0.3 },
          steam: { pressure: '3 barg' },
          body: { pressure: 15, overallHeatTransferCoefficient: 2000 },
        },
        vary: [{ field: 'body.pressure', values: [10, 15, 20] }],
      });
    expect(accepted.status).toBe(202);
    const id = (accepted.body as { id: string }).id;
    for (let i = 0; i < 400; i++) {
      const job = await request(origin).get(`/v1/jobs/${id}`).set('Authorization', `Bearer ${h.token}`);
      if ((job.body as { state: string }).state === 'succeeded') break;
      await new Promise((r) => setTimeout(r, 25));
    }
    await fc.assert(
      fc.asyncProperty(
        fc.string({ maxLength: 80 }),
        fc.string({ maxLength: 300 }),
        async (jobId, columns) => {
          const path = `/v1/jobs/${encodeURIComponent(jobId)}`;
          for (const url of [path, `${path}/result`, `${path}/result.csv`]) {
            const res = await request(origin).get(url).set('Authorization', `Bearer ${h.token}`);
            expect(res.status, url).toBeLessThan(500);
          }
          const del = await request(origin).delete(path).set('Authorization', `Bearer ${h.token}`);
          expect(del.status, path).toBeLessThan(500);
          const csv = await request(origin)
            .get(`/v1/jobs/${id}/result.csv`)
            .query({ columns })
            .set('Authorization', `Bearer ${h.token}`);
          expect(csv.status, columns).toBeLessThan(500);
        },
      ),
      { numRuns: RUNS / 10 },
    );
  });

  it.each([
    '/v1/steam/state',
    '/v1/liquors/sucrose/boiling-point',
    '/v1/liquors/sodium-hydroxide/enthalpy',
    '/v1/evaporators/single-effect',
    '/v1/evaporators/multiple-effect',
    '/v1/evaporators/mechanical-vapor-recompression',
    '/v1/studies/evaporator-schemes',
    '/v1/heat-transfer/overall-coefficient',
    '/v1/batch',
    '/v1/sweeps',
    '/v1/stored-liquors',
  ])('adversarial shapes on POST %s', async (path) => {
    await fc.assert(
      fc.asyncProperty(fc.jsonValue({ maxDepth: 3 }), (body) =>
        check('post', path, typeof body === 'object' && body !== null ? body : [body]),
      ),
      { numRuns: RUNS },
    );
  });

  it('adversarial shapes on PUT /v1/stored-liquors/{liquorId}', async () => {
    // A liquor to update, so the bodies reach validation rather than the 404.
    await request(origin)
      .post('/v1/stored-liquors')
      .set('Authorization', `Bearer ${h.token}`)
      .send({
        id: 'fuzz-target',
        definition: {
          name: 'Fuzz target (invented)',
          boilingPointRise: { polynomial: [0, 2] },
          heatCapacity: { polynomial: [4.18] },
        },
      });
    await fc.assert(
      fc.asyncProperty(fc.jsonValue({ maxDepth: 3 }), (body) =>
        check(
          'put',
          '/v1/stored-liquors/fuzz-target',
          typeof body === 'object' && body !== null ? body : [body],
        ),
      ),
      { numRuns: RUNS },
    );
  });
});
