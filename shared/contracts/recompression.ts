/** Contract of the mechanical-vapour-recompression evaporator: a single effect heated by its own compressed vapour. */
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
  type QuantitySpec,
} from './common.js';
import {
  FeedSchema,
  FiguresOfMeritSchema,
  figuresOfMeritFlag,
  ProductSpecSchema,
  StreamResultSchema,
} from './evaporators.js';
import { coefficientOrEstimate, HeatTransferBreakdownSchema } from './heat-transfer-estimate.js';
import { LiquorRefSchema } from './liquors.js';

/**
 * Thresholds of the recompression model, stated once for the contract's descriptions (the engine
 * holds the same numbers: server/engine/evaporators/mechanical-vapor-recompression.ts).
 */
export const recompressionLimits = {
  /** Default isentropic efficiency per stage (common practice 0.70–0.80). */
  isentropicEfficiency: 0.75,
  /** Default motor-and-drive efficiency (common practice 0.93–0.97). */
  driveEfficiency: 0.95,
  /** Default pressure ratio of one fan stage (common practice 1.3–1.5). */
  maxPressureRatioPerStage: 1.4,
  /** Isentropic efficiencies outside this band are warned about. */
  usualIsentropicEfficiency: { min: 0.5, max: 0.9 },
  /** BPR above this share of the saturation-temperature lift is warned about (MVR uneconomic). */
  uneconomicBprShareOfLift: 0.5,
  maxStages: 10,
  maxStagePressureRatio: 10,
} as const;

/** An efficiency: above 0, at most 1. */
const efficiencySpec: QuantitySpec = { kind: 'fraction', min: 0, max: 1, minExclusive: true };
/** A pressure difference, kPa: 0 to 1000 (give it in kPa, bar or mbar; it is not an absolute pressure). */
const pressureDropSpec: QuantitySpec = { kind: 'pressure', min: 0, max: 1000, difference: true };

/** A dimensionless number with its range stated in the refusal (422 naming the field and the range). */
function plainNumber(
  range: { min: number; max: number; minExclusive?: boolean; integer?: boolean },
  description: string,
  example: number | undefined,
) {
  const what = range.integer ? 'a whole number' : 'a number';
  const from = range.minExclusive ? `above ${range.min}` : `from ${range.min}`;
  return z
    .number()
    .superRefine((v, ctx) => {
      const ok =
        Number.isFinite(v) &&
        (range.minExclusive ? v > range.min : v >= range.min) &&
        v <= range.max &&
        (!range.integer || Number.isInteger(v));
      if (!ok) {
        ctx.addIssue({
          code: 'custom',
          message: `${v} is outside the accepted range: ${what} ${from} to ${range.max}`,
          params: { validRange: { min: range.min, max: range.max, unit: '1' } },
        });
      }
    })
    .meta({
      description: `${description}. Accepted range: ${what} ${from} to ${range.max}.`,
      ...(range.minExclusive ? { exclusiveMinimum: range.min } : { minimum: range.min }),
      maximum: range.max,
      ...(example === undefined ? {} : { example }),
    });
}

export const RecompressionBodySchema = z
  .object({
    pressure: quantity(specs.pressure, 'Pressure in the vapour space of the body', 31),
    overallHeatTransferCoefficient: coefficientOrEstimate('Overall heat-transfer coefficient U', 2500),
    temperatureDifference: quantity(
      { ...specs.superheat, minExclusive: true },
      'Design: ΔT = saturation temperature at the discharge pressure − the liquor boiling point (BPR included). Give exactly one of this, body.area or compressor.dischargePressure',
      undefined,
    ).optional(),
    area: quantity(
      specs.area,
      'Rating: the heat-transfer area; the ΔT and discharge pressure it needs are found. Give exactly one of this, body.temperatureDifference or compressor.dischargePressure',
      undefined,
    ).optional(),
    liquidHeight: quantity(
      specs.liquidHeight,
      'Liquid height above the heating surface (hydrostatic BPR at mid-depth)',
      undefined,
    ).optional(),
  })
  .strict()
  .meta({ id: 'RecompressionBody' });

export const CompressorSpecSchema = z
  .object({
    isentropicEfficiency: quantity(
      efficiencySpec,
      `Isentropic efficiency of each stage (default ${recompressionLimits.isentropicEfficiency}); outside ${recompressionLimits.usualIsentropicEfficiency.min}–${recompressionLimits.usualIsentropicEfficiency.max} the result carries an "unusual-isentropic-efficiency" warning`,
      0.75,
    ).optional(),
    driveEfficiency: quantity(
      efficiencySpec,
      `Efficiency of motor and drive together (default ${recompressionLimits.driveEfficiency})`,
      undefined,
    ).optional(),
    dischargePressure: quantity(
      specs.pressure,
      'Discharge (chest) pressure, instead of body.temperatureDifference or body.area',
      undefined,
    ).optional(),
    stages: plainNumber(
      { min: 1, max: recompressionLimits.maxStages, integer: true },
      'Number of compression stages (default: as many as maxPressureRatioPerStage needs); fewer than needed gives a "stage-pressure-ratio-above-limit" warning',
      undefined,
    ).optional(),
    maxPressureRatioPerStage: plainNumber(
      { min: 1, max: recompressionLimits.maxStagePressureRatio, minExclusive: true },
      `Pressure ratio one stage gives (default ${recompressionLimits.maxPressureRatioPerStage}, common for fans)`,
      undefined,
    ).optional(),
  })
  .strict()
  .meta({ id: 'CompressorSpec' });

export const MechanicalVaporRecompressionRequestSchema = z
  .object({
    liquor: LiquorRefSchema,
    feed: FeedSchema,
    product: ProductSpecSchema,
    body: RecompressionBodySchema,
    compressor: CompressorSpecSchema.default({}),
    heatLossFraction: quantity(
      specs.heatLossFraction,
      'Heat lost to the surroundings as a fraction of the duty',
      undefined,
    ).optional(),
    makeUpSteam: z
      .object({
        pressure: quantity(
          specs.pressure,
          'Pressure of the saturated make-up steam (at least the discharge pressure; default: saturated at the discharge pressure)',
          undefined,
        ),
      })
      .strict()
      .optional(),
    suctionPressureDrop: quantity(
      pressureDropSpec,
      'Pressure lost between the vapour space and the compressor inlet (a difference: give it in kPa, bar or mbar; a gauge or vacuum reading such as "0.05 barg" is refused; default 0)',
      undefined,
    ).optional(),
    figuresOfMerit: figuresOfMeritFlag,
    atmosphericPressure: atmosphericPressureField(),
  })
  .strict()
  .superRefine((r, ctx) => {
    const given = (
      [
        [['body', 'temperatureDifference'], r.body.temperatureDifference],
        [['body', 'area'], r.body.area],
        [['compressor', 'dischargePressure'], r.compressor.dischargePressure],
      ] as const
    ).filter(([, v]) => v !== undefined);
    if (given.length === 0) {
      ctx.addIssue({
        code: 'custom',
        path: ['body', 'temperatureDifference'],
        message:
          'give one of body.temperatureDifference (design), compressor.dischargePressure (design) or body.area (rating)',
      });
    } else if (given.length > 1) {
      const names = given.map(([p]) => p.join('.')).join(' and ');
      for (const [path] of given) {
        ctx.addIssue({
          code: 'custom',
          path: [...path],
          message: `over-determined: ${names} cannot both be given (each fixes the chest pressure); give only one`,
        });
      }
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
    id: 'MechanicalVaporRecompressionRequest',
    description:
      'A single effect heated by its own vapour, compressed in one or more stages. Exactly one of body.temperatureDifference, compressor.dischargePressure (design: the area is found) or body.area (rating: the ΔT and discharge pressure are found); two together are refused (422 naming both).',
    example: {
      liquor: 'sucrose',
      feed: { massFlow: '20 t/h', massFraction: '12 Bx', temperature: 70 },
      product: { massFraction: '20 Bx' },
      body: {
        pressure: 31,
        // U estimated at the body's state (a falling film in stainless tubes) instead of a number
        overallHeatTransferCoefficient: {
          estimate: {
            evaporatorType: 'falling-film',
            tube: {
              outsideDiameter: '50.8 mm',
              wallThickness: '1.6 mm',
              length: 10,
              material: 'stainless-316',
            },
            flow: { wettingRate: 1.2 },
          },
        },
        temperatureDifference: 5,
      },
    },
  });
export type MechanicalVaporRecompressionRequest = z.infer<typeof MechanicalVaporRecompressionRequestSchema>;

export const MechanicalVaporRecompressionResponseSchema = z
  .object({
    mode: z.enum(['design', 'rating']),
    compressor: z
      .object({
        suctionPressure: out('pressure', 'Compressor suction pressure (body pressure less the suction drop)'),
        dischargePressure: out('pressure', 'Discharge pressure (the chest pressure)'),
        pressureRatio: out({ symbol: '1', label: 'discharge / suction' }, 'Overall pressure ratio'),
        stagePressureRatio: out({ symbol: '1', label: 'per stage' }, 'Pressure ratio of each stage'),
        saturationTemperatureLift: out(
          'temperatureDifference',
          'Saturation temperature at the discharge less that at the suction',
        ),
        dischargeTemperature: out(
          'temperature',
          'Vapour temperature leaving the last stage, before desuperheating',
        ),
        stages: z.int().meta({ description: 'Number of stages' }),
        shaftPower: out('power', 'Shaft power of all stages'),
        electricPower: out('power', 'Electric power (shaft power / drive efficiency)'),
        desuperheatingWater: out(
          'massFlow',
          'Saturated condensate injected to bring the vapour to saturation after each stage (total)',
        ),
      })
      .meta({ id: 'CompressorResult' }),
    specificEnergy: out('specificEnergy', 'Electric energy per tonne of water evaporated'),
    duty: out('power', 'Heat duty crossing the heating surface'),
    temperatureDifference: out(
      'temperatureDifference',
      `ΔT = saturation temperature at the discharge − the liquor boiling point (BPR included); above ${heatingWarningThresholds.temperatureDifference} K the result carries a "large-temperature-difference" warning, below 5 K "small-temperature-difference"`,
    ),
    area: out('area', 'Heat-transfer area (the outside area of the tubes when U is estimated)'),
    boilingPointRise: out('temperatureDifference', 'Boiling-point rise of the product'),
    feed: StreamResultSchema,
    product: StreamResultSchema,
    vapor: z
      .object({
        massFlow: out('massFlow', 'Vapour (evaporation) flow: the compressor suction flow'),
        pressure: out('pressure', 'Vapour pressure (body)'),
        temperature: out('temperature', 'Vapour temperature (superheated by the boiling-point rise)'),
        enthalpy: out('specificEnthalpy', 'Vapour enthalpy (IF97 at pressure and temperature)'),
      })
      .meta({ id: 'RecompressionVaporResult' }),
    makeUpSteam: z
      .object({
        massFlow: out('massFlow', 'Make-up steam needed when the compressed vapour gives less than the duty'),
        pressure: out('pressure', 'Make-up steam pressure (saturated)'),
      })
      .meta({ id: 'MakeUpSteamResult' }),
    surplusVapor: z
      .object({
        massFlow: out('massFlow', 'Compressed vapour beyond the duty, taken to a trim condenser'),
      })
      .meta({ id: 'SurplusVaporResult' }),
    condensate: z
      .object({
        massFlow: out('massFlow', 'Condensate leaving the chest (injected water and make-up steam included)'),
        temperature: out('temperature', 'Condensate temperature (saturated at the discharge pressure)'),
      })
      .meta({ id: 'RecompressionCondensateResult' }),
    heatLoss: out('power', 'Heat lost to the surroundings (heatLossFraction × duty)'),
    figuresOfMerit: FiguresOfMeritSchema.optional().meta({
      description:
        'Desalination figures of merit (seawater, or figuresOfMerit: true). The heating steam is the make-up steam: without it the gain output ratio and performance ratio are null, with a warning; specificElectricEnergy is the compressor drive’s electric power per m³ of distillate',
    }),
    balances: z
      .object({
        mass: z.number().meta({ description: 'Relative residual of the mass balance' }),
        solute: z.number().meta({ description: 'Relative residual of the solute balance' }),
        energy: z.number().meta({
          description: 'Relative residual of the energy balance (compressor work and make-up steam included)',
        }),
      })
      .meta({ id: 'BalanceResiduals' }),
    heatTransfer: HeatTransferBreakdownSchema.optional(),
    warnings: z.array(WarningSchema),
    cautions: z.array(CautionSchema),
    provenance: ProvenanceSchema,
  })
  .meta({ id: 'MechanicalVaporRecompressionResponse' });
export type MechanicalVaporRecompressionResponse = z.infer<typeof MechanicalVaporRecompressionResponseSchema>;
