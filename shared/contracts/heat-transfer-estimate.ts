/**
 * The parts of the heat-transfer estimate that more than one operation takes: the tube, the flow,
 * fouling and measured liquor properties (the estimate's own inputs), the estimate an evaporator
 * effect may give instead of a number for U, and the breakdown of U that the overall-coefficient
 * operation returns and each evaporator effect with an estimated U reports. One schema serves all.
 */
import { z } from 'zod';
import { CautionSchema, out, quantity, specs, WarningSchema } from './common.js';

export const EVAPORATOR_TYPES = ['falling-film', 'forced-circulation', 'natural-circulation'] as const;

/** The tube materials of the engine's table (server/engine/heat-transfer/materials.ts; a test keeps them equal). */
export const WALL_MATERIALS = [
  'carbon-steel',
  'stainless-304',
  'stainless-316',
  'duplex-2205',
  'titanium-grade-2',
  'nickel-200',
  'copper-nickel-90-10',
] as const;

export const exactlyOne = (
  ctx: z.RefinementCtx,
  given: Record<string, unknown>,
  names: readonly string[],
  path: (string | number)[],
  what: string,
): void => {
  const named = names.filter((n) => given[n] !== undefined);
  const message = `give exactly one of ${names.join(' or ')} for ${what}`;
  if (named.length === 0) ctx.addIssue({ code: 'custom', path: [...path, names[0]!], message });
  if (named.length > 1) for (const n of named) ctx.addIssue({ code: 'custom', path: [...path, n], message });
};

export const TubeSchema = z
  .object({
    outsideDiameter: quantity(specs.tubeDiameter, 'Outside diameter of the tubes, D_o', '50.8 mm'),
    wallThickness: quantity(specs.wallThickness, 'Wall thickness of the tubes (D_i = D_o − 2t)', '1.6 mm'),
    length: quantity(specs.tubeLength, 'Heated length of the tubes (the condensate film height)', 8),
    wallConductivity: quantity(
      specs.wallConductivity,
      'Thermal conductivity of the tube wall, k_w (give this or material)',
      undefined,
    ).optional(),
    material: z.enum(WALL_MATERIALS).optional().meta({
      description:
        'Tube material from the table of typical conductivities near room temperature (give this or wallConductivity): carbon-steel 60.5, stainless-304 14.9, stainless-316 13.4, titanium-grade-2 21.9 W/(m·K) (Incropera & DeWitt, 6th ed., Table A.1), duplex-2205 19, nickel-200 70.2 (for hot caustic), copper-nickel-90-10 40 W/(m·K) (suppliers’ data); values recalled, check the supplier’s data',
      example: 'stainless-316',
    }),
  })
  .strict()
  .superRefine((t, ctx) => exactlyOne(ctx, t, ['wallConductivity', 'material'], [], 'the tube wall'))
  .meta({ id: 'Tube' });

export const TubeFlowSchema = z
  .object({
    wettingRate: quantity(
      specs.wettingRate,
      'Falling film: liquor mass flow per wetted perimeter Γ at the tube inlet (the inside circumference π·D_i); give this or liquorFlowPerTube',
      0.5,
    ).optional(),
    liquorFlowPerTube: quantity(
      specs.flowPerTube,
      'Falling film: liquor fed to one tube (Γ = ṁ/(π·D_i)); give this or wettingRate',
      undefined,
    ).optional(),
    evaporatedFraction: quantity(
      specs.evaporatedFraction,
      'Falling film: fraction of the inlet liquor flow evaporated in the tube (default 0); film properties and the Reynolds number are taken at the mean flow Γ_in·(1 − f/2)',
      0.3,
    ).optional(),
    tubeVelocity: quantity(
      specs.tubeVelocity,
      'Forced circulation: mean liquor velocity in the tubes',
      undefined,
    ).optional(),
    circulationVelocity: quantity(
      specs.tubeVelocity,
      'Natural circulation: the ASSUMED mean circulation velocity in the tubes (not computed; stated in the result)',
      undefined,
    ).optional(),
  })
  .strict()
  .meta({ id: 'TubeFlow' });

export const FoulingSchema = z
  .object({
    inside: quantity(
      specs.foulingResistance,
      'Fouling resistance on the liquor side, on its own (inside) surface (default: TEMA, treated boiler feedwater, 1.76e-4 m²·K/W, a typical default)',
      undefined,
    ).optional(),
    outside: quantity(
      specs.foulingResistance,
      'Fouling resistance on the steam side (default: TEMA, steam not oil-bearing, 8.81e-5 m²·K/W, a typical default)',
      undefined,
    ).optional(),
  })
  .strict()
  .meta({ id: 'Fouling' });

export const LiquorPropertiesSchema = z
  .object({
    viscosity: quantity(
      specs.viscosity,
      'Dynamic viscosity of the liquor at its state',
      undefined,
    ).optional(),
    thermalConductivity: quantity(
      specs.thermalConductivity,
      'Thermal conductivity of the liquor at its state',
      undefined,
    ).optional(),
    density: quantity(specs.density, 'Density of the liquor at its state', undefined).optional(),
    heatCapacity: quantity(
      specs.heatCapacity,
      'Isobaric heat capacity of the liquor at its state',
      undefined,
    ).optional(),
  })
  .strict()
  .meta({
    id: 'LiquorProperties',
    description:
      'Measured liquor properties at the given mass fraction and boiling temperature, used instead of the liquor model’s (and required where the model gives none)',
  });

/** The flow an evaporator type needs, and none it does not use (issues under `flow.`). */
export function refineEstimateFlow(
  r: { evaporatorType: (typeof EVAPORATOR_TYPES)[number]; flow: z.infer<typeof TubeFlowSchema> },
  ctx: z.RefinementCtx,
  at: (string | number)[] = [],
): void {
  const f = r.flow;
  const stray = (names: (keyof typeof f)[], why: string): void => {
    for (const n of names) {
      if (f[n] !== undefined) ctx.addIssue({ code: 'custom', path: [...at, 'flow', n], message: why });
    }
  };
  if (r.evaporatorType === 'falling-film') {
    exactlyOne(ctx, f, ['wettingRate', 'liquorFlowPerTube'], [...at, 'flow'], 'a falling film');
    stray(['tubeVelocity', 'circulationVelocity'], 'is not used for a falling film; omit it');
  } else {
    const needed = r.evaporatorType === 'forced-circulation' ? 'tubeVelocity' : 'circulationVelocity';
    if (f[needed] === undefined) {
      ctx.addIssue({
        code: 'custom',
        path: [...at, 'flow', needed],
        message: `is required for ${r.evaporatorType}`,
      });
    }
    stray(
      [
        'wettingRate',
        'liquorFlowPerTube',
        'evaporatedFraction',
        ...(needed === 'tubeVelocity' ? ['circulationVelocity' as const] : ['tubeVelocity' as const]),
      ],
      `is not used for ${r.evaporatorType}; omit it`,
    );
  }
}

export const EstimateSpecSchema = z
  .object({
    evaporatorType: z.enum(EVAPORATOR_TYPES).meta({
      description:
        'falling-film (Chun & Seban), forced-circulation (no boiling in the tubes; Dittus–Boelter) or natural-circulation (approximate: Dittus–Boelter at an assumed velocity combined with Mostinski nucleate boiling)',
      example: 'falling-film',
    }),
    tube: TubeSchema,
    flow: TubeFlowSchema,
    fouling: FoulingSchema.optional(),
    liquorProperties: LiquorPropertiesSchema.optional(),
  })
  .strict()
  .superRefine((r, ctx) => refineEstimateFlow(r, ctx))
  .meta({
    id: 'EffectEstimate',
    description:
      'The inputs of the overall-coefficient estimate without the liquor state: the liquor, its mass fraction, boiling temperature and pressure and the heating steam come from the effect’s solved state, and U is re-evaluated there while the balances are solved. The same tube and flow (wetting rate or flow per tube as given, not scaled) serve the effect this estimate is given for. Measured liquorProperties are taken as they are at every state.',
  });

/**
 * U of an evaporator effect: a number (or a string with a unit), or `{ estimate }` to estimate it
 * at the effect's state; U and the area then refer to the OUTSIDE area of the tubes.
 */
export const coefficientOrEstimate = (description: string, example: number) =>
  z
    .union([
      quantity(specs.heatTransferCoefficient, description, example),
      z.object({ estimate: EstimateSpecSchema }).strict().meta({
        id: 'EstimatedCoefficient',
        description:
          'Estimate U at the effect’s state (see POST /v1/heat-transfer/overall-coefficient); U and the area then refer to the outside area of the tubes. Costs the estimate’s units on top of the evaporator’s.',
      }),
    ])
    .meta({ description: `${description}: a number in W/(m²·K), a string with a unit, or { estimate }` });

const resistance = (what: string) => out('foulingResistance', `${what}, referred to the outside area`);
const share = z.number().meta({ description: 'Share of the total resistance 1/U_o (0–1)', 'x-unit': '1' });
const dimensionless = (description: string) => z.number().meta({ description, 'x-unit': '1' });

/** The estimate of U with its resistances: the answer of the overall-coefficient operation without its provenance. */
const breakdownShape = {
  evaporatorType: z.enum(EVAPORATOR_TYPES),
  overallHeatTransferCoefficient: out(
    'heatTransferCoefficient',
    'Overall heat-transfer coefficient U_o, referred to the OUTSIDE area of the tubes: 1/U_o = 1/h_o + R_fo + R_wall + R_fi·(D_o/D_i) + (D_o/D_i)/h_i',
  ),
  area: z.literal('outside').meta({ description: 'The area U and every resistance are referred to' }),
  temperatureDifference: out(
    'temperatureDifference',
    'T_steam − T_boiling (the boiling point includes the BPR)',
  ),
  heatFlux: out('heatFlux', 'Heat flux on the outside area, q_o = U_o·ΔT'),
  totalResistance: resistance('Sum of the resistances, 1/U_o'),
  liquorState: z.object({
    massFraction: out('massFraction', 'Mass fraction'),
    boilingTemperature: out('temperature', 'Boiling temperature'),
    bodyPressure: out('pressure', 'Body pressure'),
  }),
  steam: z.object({
    pressure: out('pressure', 'Heating steam pressure'),
    temperature: out('temperature', 'Condensing (saturation) temperature'),
  }),
  tube: z.object({
    outsideDiameter: out('length', 'D_o'),
    insideDiameter: out('length', 'D_i = D_o − 2t'),
    length: out('length', 'Heated length'),
  }),
  boilingSide: z
    .object({
      model: z.string().meta({ example: 'chun-seban-1971' }),
      filmCoefficient: out('heatTransferCoefficient', 'Film coefficient h_i on the inside area'),
      resistance: resistance('(D_o/D_i)/h_i'),
      share,
      reynolds: dimensionless('Reynolds number (definition in reynoldsDefinition)'),
      reynoldsDefinition: z.string(),
      prandtl: dimensionless('Prandtl number of the liquor, c_p·μ/k'),
      regime: z.string().meta({ example: 'wavy-laminar' }),
      heatFlux: out('heatFlux', 'Heat flux on the inside area'),
      surfaceTemperature: out(
        'temperature',
        'Temperature of the surface the liquor wets (its fouling layer)',
      ),
      liquorTemperature: out('temperature', 'Liquor (boiling) temperature'),
      wettingRate: z
        .object({
          inlet: out('wettingRate', 'Γ at the tube inlet'),
          mean: out('wettingRate', 'Γ at the mean of inlet and outlet flow (used)'),
          outlet: out('wettingRate', 'Γ at the tube outlet'),
        })
        .optional(),
      transitionReynolds: dimensionless('Wavy-laminar/turbulent transition Re_t = 5800·Pr^−1.06').optional(),
      velocity: out('velocity', 'Velocity in the tubes (natural circulation: the assumed value)').optional(),
      convectiveCoefficient: out('heatTransferCoefficient', 'Liquid-only convective part h_c').optional(),
      nucleateBoilingCoefficient: out(
        'heatTransferCoefficient',
        'Nucleate-boiling part h_nb (Mostinski)',
      ).optional(),
      properties: z.object({
        density: out('density', 'Liquor density'),
        viscosity: out('viscosity', 'Liquor viscosity'),
        thermalConductivity: out('thermalConductivity', 'Liquor thermal conductivity'),
        heatCapacity: out('specificHeatCapacity', 'Liquor heat capacity'),
        source: z.record(z.string(), z.enum(['model', 'given'])).meta({
          description: 'Where each property came from: the liquor model or liquorProperties',
        }),
      }),
    })
    .meta({ id: 'BoilingSide' }),
  wall: z
    .object({
      conductivity: out('thermalConductivity', 'k_w'),
      material: z.string().optional(),
      resistance: resistance('D_o·ln(D_o/D_i)/(2·k_w)'),
      share,
      heatFlux: out('heatFlux', 'Heat flux on the outside area'),
      outsideTemperature: out('temperature', 'Metal temperature on the steam side'),
      insideTemperature: out('temperature', 'Metal temperature on the liquor side'),
    })
    .meta({ id: 'WallResistance' }),
  condensingSide: z
    .object({
      model: z.string().meta({ example: 'nusselt-rohsenow' }),
      filmCoefficient: out('heatTransferCoefficient', 'Mean condensing coefficient h_o on the outside area'),
      resistance: resistance('1/h_o'),
      share,
      reynolds: dimensionless('Condensate film Reynolds number at the tube bottom, Re_δ = 4Γ/μ_l'),
      prandtl: dimensionless('Prandtl number of the condensate'),
      regime: z.enum(['laminar', 'wavy-laminar', 'turbulent']),
      heatFlux: out('heatFlux', 'Heat flux on the outside area'),
      surfaceTemperature: out('temperature', 'Temperature of the surface the condensate wets'),
      filmTemperature: out('temperature', 'Film temperature of the condensate properties, (T_sat + T_s)/2'),
      latentHeat: out('specificEnthalpy', "Rohsenow's h′_fg = h_fg + 0.68·c_p·(T_sat − T_s)"),
    })
    .meta({ id: 'CondensingSide' }),
  fouling: z
    .object({
      inside: z.object({
        resistance: out('foulingResistance', 'R_fi on the inside surface'),
        referredResistance: resistance('R_fi·(D_o/D_i)'),
        share,
        defaulted: z.boolean().meta({ description: 'true: the typical TEMA default was used' }),
        heatFlux: out('heatFlux', 'Heat flux on the inside area'),
      }),
      outside: z.object({
        resistance: out('foulingResistance', 'R_fo'),
        referredResistance: resistance('R_fo'),
        share,
        defaulted: z.boolean().meta({ description: 'true: the typical TEMA default was used' }),
        heatFlux: out('heatFlux', 'Heat flux on the outside area'),
      }),
    })
    .meta({ id: 'FoulingResistances' }),
  assumptions: z.array(z.string()),
  warnings: z.array(WarningSchema),
  cautions: z.array(CautionSchema),
};
/** The fields of {@link HeatTransferBreakdownSchema}, for the operation that adds its provenance. */
export const heatTransferBreakdownShape = breakdownShape;
export const HeatTransferBreakdownSchema = z.object(breakdownShape).meta({
  id: 'HeatTransferBreakdown',
  description:
    'The estimate of U with its resistances, on the outside area of the tubes. In an evaporator result (`heatTransfer` of the body or of effects[i]) only where U was given as { estimate }: evaluated at the solved state of that effect (the mass fraction of its liquor, its boiling temperature and pressure, the condensing temperature of its heating steam or vapour), which liquorState and steam report',
});
export type HeatTransferBreakdown = z.infer<typeof HeatTransferBreakdownSchema>;
