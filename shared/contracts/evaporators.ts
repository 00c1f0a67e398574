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
import { coefficientOrEstimate, HeatTransferBreakdownSchema } from './heat-transfer-estimate.js';
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

export const figuresOfMeritFlag = z.boolean().optional().meta({
  description:
    'Report the desalination figures of merit (`figuresOfMerit`). Default: on for the seawater liquor, off otherwise',
});

export const FiguresOfMeritSchema = z
  .object({
    gainOutputRatio: out(
      { symbol: '1', label: 'kg distillate per kg heating steam' },
      'Gain output ratio GOR = M_d / M_s: distillate (the total evaporation) per kg of heating steam; with a thermocompressor M_s is the motive steam (El-Dessouky and Ettouney, Fundamentals of Salt Water Desalination, 2002). Null without heating steam (mechanical vapour recompression without make-up steam)',
    ).nullable(),
    performanceRatio: out(
      { symbol: '1', label: 'kg distillate per 2326 kJ' },
      'Performance ratio PR = M_d · 2326 kJ/kg / Q_in, Q_in = M_s · (h_steam − h_condensate), the heat the heating (motive) steam releases down to the chest-1 condensate; 2326 kJ/kg = 1000 Btu/lb. Null without heat input',
    ).nullable(),
    specificHeatTransferArea: out(
      { symbol: 'm2/(kg/s)', label: 'm² per kg/s of distillate' },
      'Specific heat-transfer area sA = A_total / M_d; null without distillate',
    ).nullable(),
    specificThermalEnergy: out(
      { symbol: 'kW*h/m3', label: 'kWh per m³ of distillate' },
      'Specific thermal energy Q_in / V_d, V_d = M_d / (1000 kg/m³); null without distillate',
    ).nullable(),
    specificElectricEnergy: out(
      { symbol: 'kW*h/m3', label: 'kWh per m³ of distillate' },
      'Specific electric energy P_el / V_d (mechanical vapour recompression); null where no electric power is modelled',
    ).nullable(),
  })
  .meta({
    id: 'FiguresOfMerit',
    description:
      'Desalination figures of merit. Definitions after H.T. El-Dessouky and H.M. Ettouney, Fundamentals of Salt Water Desalination, Elsevier (2002). Distillate M_d = all vapour evaporated from the liquor.',
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
    overallHeatTransferCoefficient: coefficientOrEstimate('Overall heat-transfer coefficient U', 1800),
    area: quantity(
      specs.area,
      'Heat-transfer area: given → rating mode (on the outside of the tubes when U is estimated)',
      60,
    ).optional(),
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
    figuresOfMerit: figuresOfMeritFlag,
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
    area: out('area', 'Heat-transfer area (the outside area of the tubes when U is estimated)'),
    steamEconomy: out({ symbol: '1', label: 'kg vapour per kg steam' }, 'Steam economy V/S'),
    specificSteamConsumption: out(
      { symbol: '1', label: 'kg steam per kg vapour' },
      'Specific steam consumption S/V (the inverse of the steam economy)',
    ),
    waterBoilingPoint: out('temperature', 'Boiling point of pure water at the body pressure'),
    heatLoss: out('power', 'Heat lost to the surroundings (heatLossFraction × duty)'),
    figuresOfMerit: FiguresOfMeritSchema.optional(),
    heatTransfer: HeatTransferBreakdownSchema.optional(),
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
      .array(coefficientOrEstimate('U of one effect', 2000))
      .min(1)
      .max(MAX_EFFECTS)
      .meta({
        description:
          'One overall heat-transfer coefficient per effect, effect 1 first: a number, or { estimate } to estimate that effect’s U at its state while the train is solved (each entry its own tube and flow); the area of an estimated effect is then its outside tube area',
      }),
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
        'Flash the condensate of vapour chests 2…N down the train (common practice): the condensate of chest j with the liquid cascaded from the previous flash tank flashes to the pressure of chest j+1, its flash vapour joins the vapour heating that chest (reported per effect as flashVapor) and the rest cascades on',
    }),
    thermocompressor: z
      .object({
        motivePressure: quantity(
          specs.pressure,
          'Motive steam pressure (above the discharge pressure)',
          1000,
        ),
        motiveSuperheat: quantity(
          specs.superheat,
          'Superheat of the motive steam (default 0: saturated)',
          0,
        ).optional(),
        entrainedFromEffect: z.int().min(1).max(MAX_EFFECTS).optional().meta({
          description:
            'Effect whose vapour the ejector entrains (1 = steam-heated; default: the last effect)',
        }),
      })
      .strict()
      .optional()
      .meta({
        description:
          "Thermal vapour recompression: a steam-jet ejector driven by motive steam entrains vapour from an effect and discharges into the chest of effect 1, whose pressure is then `steam.pressure` (give no `steam.superheat`: the discharge's state follows from the mixing balance h_d = (Ra·h_m + h_e)/(1 + Ra)). Ra (kg motive per kg entrained) from El-Dessouky's correlation Ra = 0.296·P_c^1.19/P_e^1.04·(P_m/P_e)^0.015·PCF/TCF (kPa; PCF = 3e-7·P_m² − 0.0009·P_m + 1.6101; TCF = 2e-8·T_e² − 0.0006·T_e + 1.0047, T_e in °C), El-Dessouky and Ettouney, Fundamentals of Salt Water Desalination (2002); valid for Ra ≤ 4, 10 ≤ T_e ≤ 500 °C, 100 ≤ P_m ≤ 3500 kPa and P_c/P_e ≥ 1.81 (outside: a model-extrapolated warning). Refused (422) when the discharge is not above the suction pressure or the motive steam not above the discharge",
      }),
    figuresOfMerit: figuresOfMeritFlag,
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
    if (
      r.thermocompressor?.entrainedFromEffect !== undefined &&
      r.thermocompressor.entrainedFromEffect > r.effects
    ) {
      ctx.addIssue({
        code: 'custom',
        path: ['thermocompressor', 'entrainedFromEffect'],
        message: `there are only ${r.effects} effects`,
      });
    }
    if (r.thermocompressor && r.steam.superheat !== undefined && r.steam.superheat !== 0) {
      ctx.addIssue({
        code: 'custom',
        path: ['steam', 'superheat'],
        message:
          "with a thermocompressor the chest steam is the ejector's discharge, whose state follows from the mixing balance; omit steam.superheat",
      });
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
    // an invented four-effect seawater distiller with thermal vapour recompression
    example: {
      liquor: 'seawater',
      effects: 4,
      feed: { massFlow: 20, massFraction: 0.042, temperature: 35 },
      product: { massFraction: 0.07 },
      steam: { pressure: 35 },
      lastEffectPressure: 8,
      overallHeatTransferCoefficients: [2400, 2300, 2200, 2100],
      condensateFlash: true,
      thermocompressor: { motivePressure: '10 bar' },
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
    area: out('area', 'Heat-transfer area (the outside area of the tubes when U is estimated)'),
    vaporBleed: out('massFlow', 'Vapour bled from this effect to other users (including any feed preheat)'),
    flashVapor: out(
      'massFlow',
      "Condensate-flash vapour joining this effect's vapour to the next chest (0 without condensateFlash)",
    ),
    heatTransfer: HeatTransferBreakdownSchema.optional(),
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
    thermocompressor: z
      .object({
        motiveSteamFlow: out('massFlow', 'Motive steam M (the steam bought)'),
        entrainedVaporFlow: out('massFlow', 'Vapour entrained from the suction effect E'),
        entrainmentRatio: out(
          { symbol: '1', label: 'kg entrained per kg motive' },
          'Entrainment ratio E/M = 1/Ra',
        ),
        motivePerEntrained: out(
          { symbol: '1', label: 'kg motive per kg entrained' },
          "Ra = M/E from El-Dessouky's correlation (its validity Ra ≤ 4 applies to this)",
        ),
        compressionRatio: out({ symbol: '1', label: 'P_c/P_e' }, 'Compression ratio discharge/suction'),
        expansionRatio: out({ symbol: '1', label: 'P_m/P_e' }, 'Expansion ratio motive/suction'),
        entrainedFromEffect: z.int().meta({ description: 'Effect the vapour is entrained from' }),
        suctionPressure: out('pressure', "Suction pressure P_e (the entrained effect's vapour space)"),
        dischargeEnthalpy: out('specificEnthalpy', 'Discharge enthalpy h_d = (Ra·h_m + h_e)/(1 + Ra)'),
        dischargeTemperature: out('temperature', 'Discharge temperature at the chest pressure'),
      })
      .optional()
      .meta({
        description:
          'The ejector (with a thermocompressor). `steam` then describes the chest of effect 1 (its pressure the discharge, its flow motive + entrained) and `steamEconomy` = evaporation / motive steam',
      }),
    figuresOfMerit: FiguresOfMeritSchema.optional(),
    warnings: z.array(WarningSchema),
    cautions: z.array(CautionSchema),
    provenance: ProvenanceSchema,
  })
  .meta({ id: 'MultipleEffectResponse' });
export type MultipleEffectResponse = z.infer<typeof MultipleEffectResponseSchema>;
