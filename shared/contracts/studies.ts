/**
 * Contracts of the studies: the evaporator-scheme study ranks ways of meeting one evaporation duty
 * (multiple-effect trains, mechanical and thermal vapour recompression) by total annual cost.
 * Money is in the account's own currency (whatever the prices are given in); the study never
 * converts currencies, so money fields are plain numbers.
 */
import { z } from 'zod';
import {
  CautionSchema,
  out,
  ProvenanceSchema,
  quantity,
  specs,
  WarningSchema,
  type QuantitySpec,
} from './common.js';
import { FeedSchema, MAX_EFFECTS, ProductSpecSchema } from './evaporators.js';
import { LiquorRefSchema } from './liquors.js';

/** The largest money figure a price may be: far above any plant, a typing slip beyond. */
export const MAX_MONEY = 1e12;

/**
 * A unit-less number in [min, max] (money, hours, years, a rate or an exponent): the bounds go to
 * OpenAPI as minimum/maximum, and a refusal states both of them with `unit` (as a quantity's does).
 */
function bounded(min: number, max: number, unit: string, description: string, example: number) {
  return z
    .number()
    .superRefine((value, ctx) => {
      if (!(value >= min && value <= max)) {
        ctx.addIssue({
          code: 'custom',
          message: `${value} lies outside the accepted range ${min} to ${max}${unit ? ` ${unit}` : ''}`,
          params: { validRange: { min, max, unit } },
        });
      }
    })
    .meta({ description, example, minimum: min, maximum: max });
}

const money = (description: string, example: number, max = MAX_MONEY) =>
  bounded(
    0,
    max,
    '',
    `${description}. Money in the account's own currency (a plain number, no unit; the study never converts currencies); 0 to ${max}`,
    example,
  );

const efficiency: QuantitySpec = { kind: 'fraction', min: 0, max: 1, minExclusive: true };
// MVR bodies run on a few kelvin: 3–15 K is usual (common practice); 50 K bounds any single-stage fan or compressor.
const mvrTemperatureDifference: QuantitySpec = {
  kind: 'temperatureDifference',
  min: 0,
  max: 50,
  minExclusive: true,
};
const positiveArea: QuantitySpec = specs.area;
const positivePower: QuantitySpec = { kind: 'power', min: 0, max: 1e8, minExclusive: true };

export const SCHEMES = [
  'multiple-effect',
  'mechanical-vapor-recompression',
  'thermal-vapor-recompression',
] as const;
export const STUDY_PRICES = [
  'steamPrice',
  'electricityPrice',
  'bodyCost.reference',
  'compressorCost.reference',
] as const;

export const ScaledCostSchema = z.object({
  reference: money('Installed cost of the reference unit', 250_000),
  exponent: bounded(
    0,
    1.5,
    '',
    'Power-law exponent m of cost = reference·(size/referenceSize)^m, unit-less, 0 to 1.5 (≈ 0.6 is the usual "six-tenths" rule, common practice)',
    0.6,
  ),
});

export const SchemePricesSchema = z
  .object({
    steamPrice: money('Price of purchased steam per tonne (live, motive or make-up steam)', 25, 1e6),
    electricityPrice: money('Price of electricity per kWh', 0.12, 1e4),
    operatingHoursPerYear: bounded(
      0,
      8784,
      'h',
      'Operating hours per year, 0 to 8784 (a leap year), in hours',
      8000,
    ),
    bodyCost: ScaledCostSchema.extend({
      referenceArea: quantity(positiveArea, 'Heat-transfer area of the reference evaporator body', 100),
    })
      .strict()
      .meta({
        description:
          'Installed cost of one evaporator body of the reference area, scaled per body by (area/referenceArea)^exponent',
      }),
    compressorCost: ScaledCostSchema.extend({
      referenceShaftPower: quantity(positivePower, 'Shaft power of the reference compressor', 500),
    })
      .strict()
      .meta({
        description:
          'Installed cost of one compressor with its drive at the reference shaft power, scaled by (shaft power/referenceShaftPower)^exponent',
      }),
    interestRate: bounded(
      0,
      1,
      '',
      'Interest (discount) rate per year as a fraction, unit-less, 0 to 1 (0.08 = 8 %)',
      0.08,
    ),
    lifeYears: bounded(
      1,
      100,
      'years',
      'Economic life in years over which the installed cost is recovered, 1 to 100',
      15,
    ),
  })
  .strict()
  .meta({ id: 'SchemePrices', description: 'Prices and economic parameters, money in the account currency' });

export const EvaporatorSchemeStudyRequestSchema = z
  .object({
    liquor: LiquorRefSchema,
    feed: FeedSchema,
    product: ProductSpecSchema,
    lowestPressure: quantity(
      specs.pressure,
      'Vapour-space pressure of the last effect (of the single body for MVR): the condenser side',
      15,
    ),
    steam: z
      .object({ pressure: quantity(specs.pressure, 'Live (heating) steam pressure', '3 barg') })
      .strict()
      .meta({ description: 'Live steam, saturated at this pressure' }),
    overallHeatTransferCoefficient: quantity(
      specs.heatTransferCoefficient,
      'One overall heat-transfer coefficient U for every body of every candidate: a number only (the study does not take { estimate }; estimate U with POST /v1/heat-transfer/overall-coefficient, or run the chosen scheme with an estimate per effect)',
      2000,
    ),
    feedArrangement: z.enum(['forward', 'backward', 'parallel']).default('forward').meta({
      description: 'Liquor path of the trains (default forward)',
    }),
    maxEffects: z
      .int()
      .min(1)
      .max(MAX_EFFECTS)
      .meta({
        description: `Trains of 1…maxEffects effects are studied (1 to ${MAX_EFFECTS})`,
        example: 5,
      }),
    mvr: z
      .object({
        temperatureDifference: quantity(
          mvrTemperatureDifference,
          'ΔT of the MVR body: compressed-vapour condensing temperature minus the liquor boiling point',
          8,
        ),
        isentropicEfficiency: quantity(
          efficiency,
          'Isentropic efficiency of the compressor, above 0 to 1',
          0.75,
        ),
        driveEfficiency: quantity(efficiency, 'Efficiency of the drive (motor and gear), above 0 to 1', 0.95),
      })
      .strict()
      .optional()
      .meta({ description: 'Study a mechanical-vapour-recompression candidate (one body)' }),
    tvr: z
      .object({
        motivePressure: quantity(
          specs.pressure,
          'Motive steam pressure of the thermocompressor (above the live-steam pressure, which is its discharge)',
          '10 barg',
        ),
      })
      .strict()
      .optional()
      .meta({
        description:
          'Study a thermocompressor on trains of 1…maxEffects effects: suction from the last effect, discharge at steam.pressure',
      }),
    prices: SchemePricesSchema,
    atmosphericPressure: quantity(
      specs.atmosphericPressure,
      'The local atmospheric (barometric) pressure that gauge and vacuum readings of this request refer to (default 101.325 kPa, one standard atmosphere)',
      undefined,
    ).optional(),
  })
  .strict()
  .superRefine((r, ctx) => {
    if (r.feed.enthalpy !== undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['feed', 'enthalpy'],
        message: 'the study takes the feed enthalpy from the liquor model; omit it',
      });
    }
    if (r.product.enthalpy !== undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['product', 'enthalpy'],
        message: 'the study takes the product enthalpy from the liquor model; omit it',
      });
    }
    if (r.product.massFraction === undefined && r.product.massFlow === undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['product', 'massFraction'],
        message: 'give product.massFraction or product.massFlow',
      });
    }
  })
  .meta({
    id: 'EvaporatorSchemeStudyRequest',
    description:
      'One evaporation duty and the prices; the study ranks trains of 1…maxEffects effects (and MVR / TVR candidates when asked) by total annual cost.',
  });
export type EvaporatorSchemeStudyRequest = z.infer<typeof EvaporatorSchemeStudyRequestSchema>;

const moneyOut = (description: string) =>
  z.number().meta({ description: `${description}, in the account's currency (as the prices were given)` });

export const SchemeCandidateSchema = z
  .object({
    scheme: z.enum(SCHEMES),
    effects: z.int().meta({ description: 'Effects of the train (1 for MVR)' }),
    feasible: z.boolean(),
    reason: z.string().optional().meta({
      description:
        'Why an infeasible candidate is infeasible, in display units ("not available in this build" when the service cannot calculate the scheme)',
    }),
    steamMassFlow: out('massFlow', 'Purchased steam (live, motive or make-up); 0 when infeasible').nullable(),
    electricPower: out('power', 'Electric power drawn').nullable(),
    shaftPower: out('power', 'Compressor shaft power (0 without a compressor)').nullable(),
    totalArea: out('area', 'Heat-transfer area of all bodies').nullable(),
    annualEnergyCost: moneyOut(
      '(steam t/h × steamPrice + electric kW × electricityPrice) × hours, per year',
    ).nullable(),
    installedCost: moneyOut('Σ bodies and compressors, each scaled from its reference cost').nullable(),
    capitalRecoveryFactor: z
      .number()
      .nullable()
      .meta({ description: 'i(1+i)^y/((1+i)^y − 1), 1/y at i = 0; per year' }),
    capitalCharge: moneyOut('Capital-recovery factor × installed cost, per year').nullable(),
    totalAnnualCost: moneyOut('Annual energy cost + capital charge, per year').nullable(),
    steamEconomy: z.number().nullable().meta({
      description:
        'Water evaporated per kg of purchased steam (null without purchased steam or when infeasible)',
    }),
    warnings: z.array(WarningSchema),
  })
  .meta({
    id: 'SchemeCandidate',
    description: 'One candidate; the figures are null when it is infeasible (see reason).',
  });

export const EvaporatorSchemeStudyResponseSchema = z
  .object({
    candidates: z.array(SchemeCandidateSchema),
    cheapest: z.int().meta({ description: 'Index in candidates of the lowest total annual cost' }),
    sensitivity: z
      .array(
        z.object({
          price: z.enum(STUDY_PRICES),
          change: z.number().meta({ description: 'Relative change of that price: −0.3 or +0.3' }),
          cheapest: z.int().meta({ description: 'Index in candidates of the cheapest at the changed price' }),
          totalAnnualCost: moneyOut('Its total annual cost at the changed price'),
          changed: z.boolean().meta({ description: 'true when the cheapest differs from the base case' }),
        }),
      )
      .meta({ description: 'Each price at −30 % and +30 %, all else as given' }),
    unitsCharged: z.int().meta({
      description: 'Units billed: the sum of the single calculations the feasible candidates stand for',
    }),
    provenance: ProvenanceSchema,
    cautions: z.array(CautionSchema),
  })
  .meta({ id: 'EvaporatorSchemeStudyResponse' });
export type EvaporatorSchemeStudyResponse = z.infer<typeof EvaporatorSchemeStudyResponseSchema>;
