// The zod contracts accept the documented examples and reject bad input with the right field path.
import { describe, expect, it } from 'vitest';
import type { z } from 'zod';
import {
  BatchRequestSchema,
  BoilingPointRequestSchema,
  CustomLiquorDefinitionSchema,
  MultipleEffectRequestSchema,
  SaturationQuerySchema,
  SingleEffectRequestSchema,
  SteamStateRequestSchema,
  StoredLiquorCreateSchema,
} from '../../shared/contracts/index.js';

function paths(schema: z.ZodType, input: unknown): string[] {
  const r = schema.safeParse(input);
  return r.success ? [] : r.error.issues.map((i) => i.path.join('.'));
}

describe('documented examples', () => {
  for (const [name, schema] of Object.entries({
    SingleEffectRequestSchema,
    MultipleEffectRequestSchema,
    SteamStateRequestSchema,
    BoilingPointRequestSchema,
    CustomLiquorDefinitionSchema,
    StoredLiquorCreateSchema,
    BatchRequestSchema,
  })) {
    it(`${name} accepts its own OpenAPI example`, () => {
      const example = (schema.meta() as { example?: unknown } | undefined)?.example;
      expect(example).toBeDefined();
      expect(schema.safeParse(example).success).toBe(true);
    });
  }
});

describe('quantities', () => {
  it('accepts a number in the default unit or a string with a unit', () => {
    expect(BoilingPointRequestSchema.safeParse({ massFraction: '65 %', pressure: '1.4 bar' }).success).toBe(
      true,
    );
    expect(BoilingPointRequestSchema.safeParse({ massFraction: 0.65, pressure: 140 }).success).toBe(true);
  });

  it('rejects a mass fraction above 1 with the valid range', () => {
    const r = BoilingPointRequestSchema.safeParse({ massFraction: 1.2, pressure: 20 });
    expect(r.success).toBe(false);
    const issue = r.error!.issues[0]!;
    expect(issue.path).toEqual(['massFraction']);
    expect((issue as { params?: { validRange?: unknown } }).params?.validRange).toEqual({
      min: 0,
      max: 1,
      unit: '1',
    });
  });

  it('rejects a zero flow, a boolean pressure and an empty string', () => {
    expect(
      paths(SingleEffectRequestSchema, {
        liquor: 'sucrose',
        feed: { massFlow: 0, massFraction: 0.1, temperature: 20 },
        steam: { pressure: 300 },
        body: { pressure: 20, overallHeatTransferCoefficient: 1000 },
        product: { massFraction: 0.5 },
      }),
    ).toEqual(['feed.massFlow']);
    expect(paths(SteamStateRequestSchema, { pressure: true, temperature: 20 })).toEqual(['pressure']);
    expect(paths(SteamStateRequestSchema, { pressure: '  ', temperature: 20 })).toEqual(['pressure']);
  });
});

describe('either-or fields', () => {
  it('needs exactly one of pressure or temperature for saturation', () => {
    expect(paths(SaturationQuerySchema, {})).toEqual(['pressure']);
    expect(paths(SaturationQuerySchema, { pressure: '1', temperature: '2' })).toEqual(['temperature']);
  });

  it('needs a product target in design mode, at product.massFraction', () => {
    const body = {
      liquor: 'sucrose',
      feed: { massFlow: 1, massFraction: 0.1, temperature: 20 },
      steam: { pressure: 300 },
      body: { pressure: 20, overallHeatTransferCoefficient: 1000 },
    };
    expect(paths(SingleEffectRequestSchema, body)).toEqual(['product.massFraction']);
    expect(paths(SingleEffectRequestSchema, { ...body, body: { ...body.body, area: 40 } })).toEqual([]);
  });

  it('checks one U per effect and a mixed order naming each effect once', () => {
    const base = {
      liquor: 'sucrose',
      effects: 3,
      feed: { massFlow: 1, massFraction: 0.1, temperature: 20 },
      product: { massFraction: 0.5 },
      steam: { pressure: 300 },
      lastEffectPressure: 15,
      overallHeatTransferCoefficients: [1, 2, 3],
    };
    expect(paths(MultipleEffectRequestSchema, base)).toEqual([]);
    expect(paths(MultipleEffectRequestSchema, { ...base, overallHeatTransferCoefficients: [1, 2] })).toEqual([
      'overallHeatTransferCoefficients',
    ]);
    expect(paths(MultipleEffectRequestSchema, { ...base, feedArrangement: [1, 1, 3] })).toEqual([
      'feedArrangement',
    ]);
    expect(paths(MultipleEffectRequestSchema, { ...base, feedArrangement: [3, 1, 2] })).toEqual([]);
  });

  it('refuses a custom liquor with both a Dühring table and a polynomial', () => {
    const def = {
      name: 'x',
      boilingPointRise: { polynomial: [0, 1] },
      boilingPoint: {
        duhring: [
          {
            massFraction: 0.1,
            points: [
              { waterBoilingPoint: 50, solutionBoilingPoint: 51 },
              { waterBoilingPoint: 90, solutionBoilingPoint: 91 },
            ],
          },
        ],
      },
    };
    expect(paths(CustomLiquorDefinitionSchema, def)).toEqual(['boilingPoint']);
  });

  it('names an unknown field', () => {
    const r = SteamStateRequestSchema.safeParse({ pressure: 1, temperature: 2, colour: 'blue' });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0]).toMatchObject({ code: 'unrecognized_keys', keys: ['colour'] });
  });
});
