/** Contracts of the evaporator routes: single effect (design or rating) and multiple-effect trains. */
import { z } from 'zod';
import {
  atmosphericPressureField,
  CautionSchema,
  heatingWarningThresholds,
  out,
  ProvenanceSchema,
  quantity,
  specs,
  WarningSchema,
} from './common.js';
import { LiquorRefSchema } from './liquors.js';

export const FeedSchema = z
  .object({
    massFlow: quantity(specs.massFlow, 'Feed mass flow', '4.5 t/h'),
    massFraction: quantity(specs.massFraction, 'Feed mass fraction of solute', 0.1),
    temperature: quantity(specs.temperature, 'Feed temperature', 40),
    enthalpy: quantity(
      specs.enthalpy,
      'Feed enthalpy (default: from the liquor model at the feed temperature)',
      150,
    ).optional(),
  })
  .strict()
  .meta({ id: 'Feed' });

/**
 * The single-effect feed: as {@link FeedSchema}, but the mass flow may be left out in rating, where
 * it is what a given area and product concentration determine.
 */
export const SingleEffectFeedSchema = FeedSchema.extend({
  massFlow: quantity(
    specs.massFlow,
    'Feed mass flow. Required in design; in rating (body.area given) give this to find the product, or omit it and give product.massFraction to find the feed',
    '4.5 t/h',
  ).optional(),
}).meta({ id: 'SingleEffectFeed' });

export const ProductSpecSchema = z
  .object({
    massFraction: quantity(
      specs.massFraction,
      'Product mass fraction of solute (give this or massFlow)',
      0.3,
    ).optional(),
    massFlow: quantity(specs.massFlow, 'Product mass flow (give this or massFraction)', 0.5).optional(),
    enthalpy: quantity(
      specs.enthalpy,
      'Product enthalpy (default: from the liquor model at the boiling point)',
      300,
    ).optional(),
  })
  .strict()
  .superRefine((p, ctx) => {
    const given = (p.massFraction !== undefined ? 1 : 0) + (p.massFlow !== undefined ? 1 : 0);
    if (given > 1)
      ctx.addIssue({
        code: 'custom',
        path: ['massFlow'],
        message: 'give massFraction or massFlow, not both',
      });
  })
  .meta({
    id: 'ProductSpec',
    description: 'Design: the product mass fraction or flow. Rating (body.area given): may be omitted.',
  });

export const SteamSpecSchema = z
  .object({
    pressure: quantity(
      specs.pressure,
      'Heating steam pressure (give this or temperature)',
      '2 barg',
    ).optional(),
    temperature: quantity(
      specs.temperature,
      'Heating steam saturation temperature (give this or pressure)',
      133,
    ).optional(),
    superheat: quantity(
      specs.superheat,
      `Superheat of the heating steam above saturation; above ${heatingWarningThresholds.steamSuperheat} K the result carries a "large-steam-superheat" warning`,
      0,
    ).optional(),
    condensateSubcooling: quantity(
      specs.superheat,
      'Subcooling of the steam condensate below saturation when it leaves the chest (default 0: saturated)',
      0,
    ).optional(),
  })
  .strict()
  .superRefine((s, ctx) => {
    const given = (s.pressure !== undefined ? 1 : 0) + (s.temperature !== undefined ? 1 : 0);
    if (given !== 1) {
      ctx.addIssue({
        code: 'custom',
        path: given === 0 ? ['pressure'] : ['temperature'],
        message: 'give exactly one of pressure or temperature for the heating steam',
      });
    }
  })
  .meta({ id: 'SteamSpec' });

export const BodySpecSchema = z
  .object({
    pressure: quantity(specs.pressure, 'Pressure in the vapour space of the body', 20),
    overallHeatTransferCoefficient: quantity(
      specs.heatTransferCoefficient,
      'Overall heat-transfer coefficient U',
      1800,
    ),
    area: quantity(specs.area, 'Heat-transfer area: given → rating mode', 60).optional(),
    liquidHeight: quantity(
      specs.liquidHeight,
      'Liquid height above the heating surface (hydrostatic BPR at mid-depth)',
      1.5,
    ).optional(),
  })
  .strict()
  .meta({ id: 'BodySpec' });

const heatLossFraction = quantity(
  specs.heatLossFraction,
  'Heat lost to the surroundings as a fraction of the steam duty',
  0.02,
);

export const SingleEffectRequestSchema = z
  .object({
    liquor: LiquorRefSchema,
    feed: SingleEffectFeedSchema,
    product: ProductSpecSchema.default({}),
    steam: SteamSpecSchema,
    body: BodySpecSchema,
    heatLossFraction: heatLossFraction.optional(),
    atmosphericPressure: atmosphericPressureField(),
  })
  .strict()
  .superRefine((r, ctx) => {
    const designTargets =
      (r.product.massFraction !== undefined ? 1 : 0) + (r.product.massFlow !== undefined ? 1 : 0);
    if (r.body.area === undefined) {
      if (designTargets === 0) {
        ctx.addIssue({
          code: 'custom',
          path: ['product', 'massFraction'],
          message: 'design mode (no body.area) needs product.massFraction or product.massFlow',
        });
      }
      if (r.feed.massFlow === undefined) {
        ctx.addIssue({
          code: 'custom',
          path: ['feed', 'massFlow'],
          message: 'is required in design mode (no body.area)',
        });
      }
      return;
    }
    // Rating: body.area fixes one more quantity, so exactly one of feed.massFlow and
    // product.massFraction is given and the other is found. Both given over-determine the
    // case; neither leaves it open. Never drop a given value silently.
    const hasFeed = r.feed.massFlow !== undefined;
    const hasProduct = r.product.massFraction !== undefined;
    if (hasFeed && hasProduct) {
      const message =
        'over-determined: with body.area given, feed.massFlow and product.massFraction cannot both be given (each is found from the other); omit one';
      ctx.addIssue({ code: 'custom', path: ['feed', 'massFlow'], message });
      ctx.addIssue({ code: 'custom', path: ['product', 'massFraction'], message });
    } else if (!hasFeed && !hasProduct) {
      ctx.addIssue({
        code: 'custom',
        path: ['feed', 'massFlow'],
        message:
          'rating (body.area given) needs feed.massFlow (to find the product) or product.massFraction (to find the feed)',
      });
    }
  })
  .meta({
    id: 'SingleEffectRequest',
    description:
      'Design (product given, area found) or rating (body.area given): with feed.massFlow the product is found, with product.massFraction instead the feed is found. Giving both in rating is refused (422 naming both fields), never silently overridden.',
    example: {
      liquor: 'sodium-hydroxide',
      feed: { massFlow: '4.5 t/h', massFraction: 0.1, temperature: 40 },
      product: { massFraction: 0.3 },
      steam: { pressure: '3 barg' },
      body: { pressure: 20, overallHeatTransferCoefficient: 1800 },
    },
  });
export type SingleEffectRequest = z.infer<typeof SingleEffectRequestSchema>;

export const StreamResultSchema = z
  .object({
    massFlow: out('massFlow', 'Mass flow'),
    massFraction: out('massFraction', 'Mass fraction of solute'),
    temperature: out('temperature', 'Temperature'),
    enthalpy: out('specificEnthalpy', 'Specific enthalpy'),
  })
  .meta({ id: 'StreamResult', description: 'A liquor stream: feed or product.' });

export const SteamOutSchema = z
  .object({
    massFlow: out('massFlow', 'Heating steam consumption'),
    pressure: out('pressure', 'Heating steam pressure'),
    temperature: out('temperature', 'Condensing temperature'),
    latentHeat: out('specificEnthalpy', 'Heat given per kg of steam (latent heat plus any desuperheat)'),
  })
  .meta({ id: 'SteamResult' });

export const SingleEffectResponseSchema = z
  .object({
    mode: z.enum(['design', 'rating']),
    feed: StreamResultSchema,
    product: StreamResultSchema,
    vapor: z
      .object({
        massFlow: out('massFlow', 'Vapour (evaporation) flow'),
        pressure: out('pressure', 'Vapour pressure'),
        temperature: out('temperature', 'Vapour temperature (superheated by the boiling-point rise)'),
        enthalpy: out('specificEnthalpy', 'Vapour enthalpy (IF97 at pressure and temperature)'),
      })
      .meta({ id: 'VaporResult' }),
    steam: SteamOutSchema,
    boilingPointRise: out('temperatureDifference', 'Boiling-point rise of the product'),
    duty: out('power', 'Heat duty Q = S·λ'),
    temperatureDifference: out(
      'temperatureDifference',
      `ΔT = T_steam − T_boiling (boiling point includes the BPR); above ${heatingWarningThresholds.temperatureDifference} K the result carries a "large-temperature-difference" warning, below 5 K "small-temperature-difference"`,
    ),
    area: out('area', 'Heat-transfer area'),
    steamEconomy: out({ symbol: '1', label: 'kg vapour per kg steam' }, 'Steam economy V/S'),
    specificSteamConsumption: out(
      { symbol: '1', label: 'kg steam per kg vapour' },
      'Specific steam consumption S/V (the inverse of the steam economy)',
    ),
    waterBoilingPoint: out('temperature', 'Boiling point of pure water at the body pressure'),
    heatLoss: out('power', 'Heat lost to the surroundings (heatLossFraction × duty)'),
    warnings: z.array(WarningSchema),
    cautions: z.array(CautionSchema),
    provenance: ProvenanceSchema,
  })
  .meta({ id: 'SingleEffectResponse' });
export type SingleEffectResponse = z.infer<typeof SingleEffectResponseSchema>;

export const MAX_EFFECTS = 10;

export const FeedArrangementSchema = z
  .union([
    z.enum(['forward', 'backward', 'parallel']),
    z.array(z.int().min(1).max(MAX_EFFECTS)).min(1).max(MAX_EFFECTS).meta({
      description: 'Mixed order: the effect numbers (1 = steam-heated) in the order the liquor passes them',
    }),
  ])
  .meta({ id: 'FeedArrangement' });

export const MultipleEffectRequestSchema = z
  .object({
    liquor: LiquorRefSchema,
    effects: z.int().min(1).max(MAX_EFFECTS).meta({ description: 'Number of effects', example: 3 }),
    feedArrangement: FeedArrangementSchema.default('forward'),
    feed: FeedSchema,
    product: ProductSpecSchema.default({}),
    steam: SteamSpecSchema,
    lastEffectPressure: quantity(specs.pressure, 'Pressure in the last effect (condenser side)', 15),
    atmosphericPressure: atmosphericPressureField(),
    overallHeatTransferCoefficients: z
      .array(quantity(specs.heatTransferCoefficient, 'U of one effect', 2000))
      .min(1)
      .max(MAX_EFFECTS)
      .meta({ description: 'One overall heat-transfer coefficient per effect, effect 1 first' }),
    areas: z
      .array(quantity(specs.area, 'Area of one effect', 80))
      .min(1)
      .max(MAX_EFFECTS)
      .optional()
      .meta({ description: 'Given areas (rating); default: design for equal areas' }),
    vaporBleeds: z
      .array(
        z
          .object({
            effect: z.int().min(1).max(MAX_EFFECTS).meta({ description: 'Effect whose vapour is bled' }),
            massFlow: quantity(specs.bleedFlow, 'Vapour taken to other users', 0.2),
          })
          .strict(),
      )
      .max(MAX_EFFECTS)
      .optional(),
    feedPreheat: z
      .object({
        temperature: quantity(
          specs.temperature,
          'Temperature the fresh feed is heated to before it enters',
          80,
        ),
        source: z
          .union([
            z.literal('external'),
            z.object({ vaporFromEffect: z.int().min(1).max(MAX_EFFECTS) }).strict(),
          ])
          .default('external')
          .meta({
            description:
              '"external" (another heat source; its duty is reported) or vapour bled from an effect (added to that effect\'s bleed)',
          }),
      })
      .strict()
      .optional()
      .meta({ description: 'Feed preheating before the first effect the liquor enters' }),
    condensateFlash: z.boolean().optional().meta({
      description:
        'Flash the condensate of vapour chests 2…N down the train; its flash vapour joins the vapour heating the next chest',
    }),
  })
  .strict()
  .superRefine((r, ctx) => {
    if (r.feed.enthalpy !== undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['feed', 'enthalpy'],
        message: 'the multiple-effect model takes the feed enthalpy from the liquor model; omit it',
      });
    }
    if (r.product.enthalpy !== undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['product', 'enthalpy'],
        message: 'the multiple-effect model takes the product enthalpy from the liquor model; omit it',
      });
    }
    if (r.areas !== undefined && (r.product.massFraction !== undefined || r.product.massFlow !== undefined)) {
      ctx.addIssue({
        code: 'custom',
        path: ['product'],
        message:
          'with given areas (rating) the product is found; omit product.massFraction and product.massFlow',
      });
    }
    if (r.overallHeatTransferCoefficients.length !== r.effects) {
      ctx.addIssue({
        code: 'custom',
        path: ['overallHeatTransferCoefficients'],
        message: `give one coefficient per effect (${r.effects})`,
      });
    }
    if (r.areas && r.areas.length !== r.effects) {
      ctx.addIssue({ code: 'custom', path: ['areas'], message: `give one area per effect (${r.effects})` });
    }
    if (Array.isArray(r.feedArrangement)) {
      const sorted = [...r.feedArrangement].sort((a, b) => a - b);
      if (sorted.length !== r.effects || sorted.some((e, i) => e !== i + 1)) {
        ctx.addIssue({
          code: 'custom',
          path: ['feedArrangement'],
          message: `a mixed order must name each effect 1…${r.effects} once`,
        });
      }
    }
    r.vaporBleeds?.forEach((b, i) => {
      if (b.effect > r.effects) {
        ctx.addIssue({
          code: 'custom',
          path: ['vaporBleeds', i, 'effect'],
          message: `there are only ${r.effects} effects`,
        });
      }
    });
    if (r.areas === undefined && r.product.massFraction === undefined && r.product.massFlow === undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['product', 'massFraction'],
        message: 'design mode (no areas) needs product.massFraction or product.massFlow',
      });
    }
  })
  .meta({
    id: 'MultipleEffectRequest',
    example: {
      liquor: 'sodium-hydroxide',
      effects: 3,
      feedArrangement: 'backward',
      feed: { massFlow: '12 t/h', massFraction: 0.1, temperature: 50 },
      product: { massFraction: 0.4 },
      steam: { pressure: '4 barg' },
      lastEffectPressure: 15,
      overallHeatTransferCoefficients: [2500, 2000, 1500],
    },
  });
export type MultipleEffectRequest = z.infer<typeof MultipleEffectRequestSchema>;

export const EffectResultSchema = z
  .object({
    pressure: out('pressure', 'Vapour-space pressure'),
    vaporTemperature: out('temperature', 'Saturation temperature of water at the effect pressure'),
    boilingPoint: out('temperature', 'Boiling point of the liquor leaving the effect'),
    boilingPointRise: out('temperatureDifference', 'Boiling-point rise'),
    temperatureDifference: out(
      'temperatureDifference',
      `ΔT between the heating medium and the boiling liquor; above ${heatingWarningThresholds.temperatureDifference} K the result carries a "large-temperature-difference" warning`,
    ),
    liquorFlow: out('massFlow', 'Liquor leaving the effect'),
    massFraction: out('massFraction', 'Mass fraction of the liquor leaving the effect'),
    vaporFlow: out('massFlow', 'Vapour produced'),
    duty: out('power', 'Heat duty'),
    area: out('area', 'Heat-transfer area'),
    vaporBleed: out('massFlow', 'Vapour bled from this effect to other users (including any feed preheat)'),
  })
  .meta({ id: 'EffectResult' });

export const MultipleEffectResponseSchema = z
  .object({
    effects: z.array(EffectResultSchema),
    steam: SteamOutSchema,
    product: StreamResultSchema,
    totalArea: out('area', 'Sum of the areas'),
    evaporation: out('massFlow', 'Total water evaporated'),
    steamEconomy: out({ symbol: '1', label: 'kg vapour per kg steam' }, 'Steam economy'),
    iterations: z.int().meta({ description: 'Solver iterations' }),
    residual: z.number().meta({
      description: 'Largest relative residual of the balances at the solution (dimensionless)',
    }),
    feedPreheatDuty: out('power', 'Duty of the feed preheater (0 without preheat)'),
    warnings: z.array(WarningSchema),
    cautions: z.array(CautionSchema),
    provenance: ProvenanceSchema,
  })
  .meta({ id: 'MultipleEffectResponse' });
export type MultipleEffectResponse = z.infer<typeof MultipleEffectResponseSchema>;
