// Evaporator routes at their edges: rating honours every given input or refuses the conflict,
// a pure-water feed, sucrose near its temperature limit, multiple-effect refusals that name the
// effect, the physical range of every quantity kind, and the heating-side warnings.
import request from 'supertest';
import { beforeAll, describe, expect, it } from 'vitest';
import {
  LARGE_STEAM_SUPERHEAT,
  LARGE_TEMPERATURE_DIFFERENCE,
} from '../../server/engine/evaporators/common.js';
import { heatingWarningThresholds, physicalRanges, quantityKinds } from '../../shared/contracts/common.js';
import { makeHarness, type Harness } from './helpers.js';

let h: Harness;
beforeAll(async () => {
  h = await makeHarness({ quota: 100_000 });
});
const post = (path: string, body: object) =>
  request(h.app)
    .post(path)
    .set({ Authorization: `Bearer ${h.token}` })
    .send(body);
const single = (body: object) => post('/v1/evaporators/single-effect', body);
const multiple = (body: object) => post('/v1/evaporators/multiple-effect', body);

const caustic = {
  liquor: 'sodium-hydroxide',
  feed: { massFlow: 2, massFraction: 0.1, temperature: 50 },
  product: { massFraction: 0.3 },
  steam: { pressure: 300 },
  body: { pressure: 20, overallHeatTransferCoefficient: 1500 },
};
type Errors = { field: string; message: string; validRange?: { min: number; max: number; unit: string } }[];
const fields = (res: request.Response) => (res.body.errors as Errors).map((e) => e.field);

describe('single-effect rating honours every given input', () => {
  it('refuses feed.massFlow with product.massFraction and body.area, naming both fields', async () => {
    const res = await single({
      ...caustic,
      feed: { ...caustic.feed, massFlow: 99 },
      body: { ...caustic.body, area: 60 },
    });
    expect(res.status).toBe(422);
    expect(fields(res)).toEqual(expect.arrayContaining(['feed.massFlow', 'product.massFraction']));
    expect(res.body.errors[0].message).toMatch(/body\.area/);
  });

  it('finds the feed when feed.massFlow is omitted, and gives back the designed feed', async () => {
    const design = await single(caustic);
    expect(design.status).toBe(200);
    const { massFlow: _omit, ...feed } = caustic.feed;
    const rating = await single({ ...caustic, feed, body: { ...caustic.body, area: design.body.area } });
    expect(rating.status).toBe(200);
    expect(rating.body.mode).toBe('rating');
    // design → rating round trip: the same area and product need the same feed (2 kg/s).
    expect(rating.body.feed.massFlow).toBeCloseTo(2, 8);
    expect(rating.body.area).toBeCloseTo(design.body.area, 6);
  });

  it('keeps a given feed.massFlow in rating with the feed fixed', async () => {
    const design = await single(caustic);
    const { product: _omit, ...rest } = caustic;
    const rating = await single({ ...rest, body: { ...caustic.body, area: design.body.area } });
    expect(rating.status).toBe(200);
    expect(rating.body.feed.massFlow).toBe(2);
    expect(rating.body.product.massFraction).toBeCloseTo(0.3, 6);
  });

  it('refuses design without feed.massFlow, naming it', async () => {
    const { massFlow: _omit, ...feed } = caustic.feed;
    const res = await single({ ...caustic, feed });
    expect(res.status).toBe(422);
    expect(fields(res)).toContain('feed.massFlow');
  });
});

describe('single-effect edge cases', () => {
  it('evaporates F − L from a pure-water feed given a product mass flow', async () => {
    const res = await single({
      ...caustic,
      feed: { massFlow: 10, massFraction: 0, temperature: 50 },
      product: { massFlow: 6 },
    });
    expect(res.status).toBe(200);
    // Mass balance F = L + V (domain primer §1).
    expect(res.body.vapor.massFlow).toBeCloseTo(4, 9);
    expect(res.body.product.massFraction).toBe(0);
    expect(Number.isFinite(res.body.specificSteamConsumption)).toBe(true);
  });

  it('designs sucrose at 200 kPa boiling near 131 °C with a solubility warning, not a refusal', async () => {
    const res = await single({
      liquor: 'sucrose',
      feed: { massFlow: 1, massFraction: 0.5, temperature: 87 },
      product: { massFraction: 0.8 },
      steam: { pressure: 600 },
      body: { pressure: 200, overallHeatTransferCoefficient: 1500 },
    });
    expect(res.status).toBe(200);
    // IF97: water boils at 120.2 °C at 200 kPa; an 80 % syrup about 10 K higher.
    expect(res.body.product.temperature).toBeGreaterThan(130);
    const w = (res.body.warnings as { code: string; field?: string }[]).find(
      (x) => x.code === 'solubility-not-checked',
    );
    expect(w?.field).toBe('product.massFraction');
  });
});

describe('multiple-effect refusals name the effect', () => {
  it('refuses seawater above 120 °C as effects[i].boilingTemperature in °C with "effect i:"', async () => {
    const res = await multiple({
      liquor: 'seawater',
      effects: 3,
      feed: { massFlow: 10, massFraction: 0.035, temperature: 50 },
      product: { massFraction: 0.07 },
      steam: { pressure: 500 },
      lastEffectPressure: 250,
      overallHeatTransferCoefficients: [2000, 2000, 2000],
    });
    expect(res.status).toBe(422);
    const e = (res.body.errors as Errors)[0]!;
    expect(e.field).toMatch(/^effects\[\d\]\.boilingTemperature$/);
    // Said in °C to 0.01 °C, from the error's data (not the engine's SI text).
    expect(e.message).toMatch(/^effect \d: effects\[\d\]\.boilingTemperature = \d+\.\d{1,2} °C is outside/);
    // Sharqawy et al. (2010): the seawater correlation is refused above 120 °C.
    expect(e.validRange).toEqual({ min: 0, max: 120, unit: 'degC' });
    expect(res.body.detail).not.toMatch(/ K |Pa/);
  });

  it('labels liquor warnings by effect, never as lastEffectPressure', async () => {
    const res = await multiple({
      liquor: 'sucrose',
      effects: 2,
      feed: { massFlow: 10, massFraction: 0.15, temperature: 50 },
      product: { massFraction: 0.88 },
      steam: { pressure: 400 },
      lastEffectPressure: 15,
      overallHeatTransferCoefficients: [2000, 2000],
    });
    expect(res.status).toBe(200);
    const ws = res.body.warnings as { code: string; field?: string; message: string }[];
    expect(ws.map((w) => w.field)).toContain('effects[1].massFraction');
    expect(ws.filter((w) => w.field === 'lastEffectPressure')).toEqual([]);
    for (const w of ws.filter((x) => x.field?.startsWith('effects[')))
      expect(w.message).toMatch(/^effect \d: /);
  });
});

describe('bounds of plausibility', () => {
  // One out-of-range value per quantity kind the single-effect request takes, with the range
  // expected in the default unit (the contract's physicalRanges, each bound explained there).
  const cases: { name: string; patch: object; field: string; range: [number, number, string] }[] = [
    {
      name: 'mass flow',
      patch: { feed: { ...caustic.feed, massFlow: 1.2e29 } },
      field: 'feed.massFlow',
      range: [0, 10_000, 'kg/s'],
    },
    {
      name: 'temperature',
      patch: { feed: { ...caustic.feed, temperature: 5000 } },
      field: 'feed.temperature',
      range: [-50, 2000, 'degC'],
    },
    {
      name: 'specific enthalpy',
      patch: { feed: { ...caustic.feed, enthalpy: 2e4 } },
      field: 'feed.enthalpy',
      range: [-10_000, 10_000, 'kJ/kg'],
    },
    {
      name: 'pressure',
      patch: { body: { ...caustic.body, pressure: 2e5 } },
      field: 'body.pressure',
      range: [0.1, 100_000, 'kPa'],
    },
    {
      name: 'heat-transfer coefficient',
      patch: { body: { ...caustic.body, overallHeatTransferCoefficient: 0.5 } },
      field: 'body.overallHeatTransferCoefficient',
      range: [1, 20_000, 'W/(m2*K)'],
    },
    {
      name: 'area',
      patch: { body: { ...caustic.body, area: 2e6 }, product: {} },
      field: 'body.area',
      range: [0, 1e6, 'm2'],
    },
    {
      name: 'length',
      patch: { body: { ...caustic.body, liquidHeight: 40 } },
      field: 'body.liquidHeight',
      range: [0, 30, 'm'],
    },
    {
      name: 'temperature difference',
      patch: { steam: { pressure: 300, superheat: 3000 } },
      field: 'steam.superheat',
      range: [0, 2000, 'K'],
    },
    {
      name: 'mass fraction',
      patch: { product: { massFraction: 1.5 } },
      field: 'product.massFraction',
      range: [0, 1, '1'],
    },
    { name: 'fraction', patch: { heatLossFraction: 0.9 }, field: 'heatLossFraction', range: [0, 0.5, '1'] },
  ];
  for (const c of cases) {
    it(`refuses a ${c.name} outside its physical range with a 422 naming ${c.field} and the range`, async () => {
      const res = await single({ ...caustic, ...c.patch });
      expect(res.status).toBe(422);
      const e = (res.body.errors as Errors).find((x) => x.field === c.field);
      expect(e?.validRange).toEqual({ min: c.range[0], max: c.range[1], unit: c.range[2] });
      expect(e?.message).toMatch(/lies outside the accepted range/);
    });
  }

  it('says "feed.massFlow: 1.2e+29 kg/s lies outside the accepted range above 0 to 10 000 kg/s"', async () => {
    const res = await single({ ...caustic, feed: { ...caustic.feed, massFlow: 1.2e29 } });
    expect(res.body.detail).toBe(
      'feed.massFlow: 1.2e+29 kg/s lies outside the accepted range above 0 to 10 000 kg/s',
    );
  });

  it('checks a string with a unit after converting it to the default unit', async () => {
    // 1e9 t/h = 2.78e8 kg/s (1 t/h = 1/3.6 kg/s, exact).
    const res = await single({ ...caustic, feed: { ...caustic.feed, massFlow: '1e9 t/h' } });
    expect(res.status).toBe(422);
    expect(res.body.errors[0]).toMatchObject({
      field: 'feed.massFlow',
      validRange: { min: 0, max: 10_000, unit: 'kg/s' },
    });
    expect(res.body.errors[0].message).toMatch(
      // 4 significant digits: 2.778e8 kg/s
      /^"1e9 t\/h" = 277800000 kg\/s lies outside the accepted range above 0 to 10 000 kg\/s$/,
    );
  });

  it('declares a range for every quantity kind and shows it in OpenAPI as minimum/maximum', async () => {
    for (const kind of quantityKinds) {
      const r = physicalRanges[kind];
      expect(r.min).toBeLessThan(r.max);
    }
    const doc = (await request(h.app).get('/openapi.json')).body as {
      components: { schemas: Record<string, { properties: Record<string, { anyOf: object[] }> }> };
    };
    expect(doc.components.schemas.SingleEffectFeed!.properties.massFlow!.anyOf[0]).toEqual({
      type: 'number',
      exclusiveMinimum: 0,
      maximum: 10_000,
    });
  });
});

describe('heating-side warnings', () => {
  it('states the same thresholds in the engine and in the API contract', () => {
    expect(LARGE_STEAM_SUPERHEAT).toBe(heatingWarningThresholds.steamSuperheat);
    expect(LARGE_TEMPERATURE_DIFFERENCE).toBe(heatingWarningThresholds.temperatureDifference);
  });

  it('warns of steam superheated above 50 K and a ΔT above 60 K, as result data', async () => {
    const res = await single({
      ...caustic,
      product: { massFraction: 0.2 },
      steam: { pressure: 700, superheat: 80 },
      body: { pressure: 15, overallHeatTransferCoefficient: 1500 },
    });
    expect(res.status).toBe(200);
    // IF97: 700 kPa steam condenses at 165 °C; 20 % NaOH at 15 kPa boils near 62 °C.
    expect(res.body.temperatureDifference).toBeGreaterThan(60);
    const ws = res.body.warnings as { code: string; field?: string; validRange?: object }[];
    expect(ws).toEqual(
      expect.arrayContaining([
        expect.objectContaining({
          code: 'large-steam-superheat',
          field: 'steam.superheat',
          validRange: { min: 0, max: 50, unit: 'K' },
        }),
        expect.objectContaining({ code: 'large-temperature-difference', field: 'temperatureDifference' }),
      ]),
    );
  });
});
