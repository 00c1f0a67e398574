/** Contracts of the steam-table routes (IAPWS-IF97). */
import { z } from 'zod';
import { atmosphericPressureField, out, ProvenanceSchema, quantity, specs } from './common.js';

export const SaturationQuerySchema = z
  .object({
    pressure: quantity(specs.pressure, 'Saturation pressure', '1.4 bar').optional(),
    atmosphericPressure: atmosphericPressureField(),
    // No pre-filled example: the documented request gives the pressure only (exactly one of the two).
    temperature: quantity(
      specs.temperature,
      'Saturation temperature (instead of pressure, e.g. 120)',
      undefined,
    ).optional(),
  })
  .superRefine((q, ctx) => {
    const given = (q.pressure !== undefined ? 1 : 0) + (q.temperature !== undefined ? 1 : 0);
    if (given !== 1) {
      ctx.addIssue({
        code: 'custom',
        path: given === 0 ? ['pressure'] : ['temperature'],
        message: 'give exactly one of pressure or temperature',
      });
    }
  })
  .meta({ description: 'Exactly one of pressure or temperature.' });
export type SaturationQuery = z.infer<typeof SaturationQuerySchema>;

export const PhasePropertiesSchema = z
  .object({
    enthalpy: out('specificEnthalpy', 'Specific enthalpy'),
    entropy: out('specificEntropy', 'Specific entropy'),
    specificVolume: out({ symbol: 'm3/kg', label: 'm³/kg' }, 'Specific volume'),
    density: out({ symbol: 'kg/m3', label: 'kg/m³' }, 'Density'),
    heatCapacity: out('specificHeatCapacity', 'Isobaric specific heat capacity'),
    viscosity: out({ symbol: 'Pa*s', label: 'Pa·s' }, 'Dynamic viscosity (IAPWS R12-08)'),
    thermalConductivity: out({ symbol: 'W/(m*K)', label: 'W/(m·K)' }, 'Thermal conductivity (IAPWS R15-11)'),
  })
  .meta({ id: 'PhaseProperties', description: 'Properties of one saturated phase.' });

export const SaturationResponseSchema = z
  .object({
    pressure: out('pressure', 'Saturation pressure'),
    temperature: out('temperature', 'Saturation temperature'),
    latentHeat: out('specificEnthalpy', 'Latent heat of vaporisation h_g − h_f'),
    liquid: PhasePropertiesSchema,
    vapor: PhasePropertiesSchema,
    provenance: ProvenanceSchema,
  })
  .meta({ id: 'SaturationResponse', description: 'Saturated water and steam (IAPWS-IF97 region 4).' });
export type SaturationResponse = z.infer<typeof SaturationResponseSchema>;

export const SteamStateRequestSchema = z
  .object({
    pressure: quantity(specs.pressure, 'Pressure', 1000),
    atmosphericPressure: atmosphericPressureField(),
    temperature: quantity(specs.temperature, 'Temperature (give this or enthalpy)', 250).optional(),
    enthalpy: quantity(specs.enthalpy, 'Specific enthalpy (give this or temperature)', 2800).optional(),
  })
  .strict()
  .superRefine((b, ctx) => {
    const given = (b.temperature !== undefined ? 1 : 0) + (b.enthalpy !== undefined ? 1 : 0);
    if (given !== 1) {
      ctx.addIssue({
        code: 'custom',
        path: given === 0 ? ['temperature'] : ['enthalpy'],
        message: 'give exactly one of temperature or enthalpy with the pressure',
      });
    }
  })
  .meta({
    id: 'SteamStateRequest',
    description: 'A state of water or steam at (pressure, temperature) or (pressure, enthalpy).',
    example: { pressure: '10 bar', temperature: 250 },
  });
export type SteamStateRequest = z.infer<typeof SteamStateRequestSchema>;

export const SteamStateResponseSchema = z
  .object({
    region: z.int().min(1).max(5).meta({ description: 'IAPWS-IF97 region (4 = two-phase)' }),
    phase: z.enum(['liquid', 'vapor', 'two-phase', 'supercritical']),
    pressure: out('pressure', 'Pressure'),
    temperature: out('temperature', 'Temperature'),
    enthalpy: out('specificEnthalpy', 'Specific enthalpy'),
    entropy: out('specificEntropy', 'Specific entropy'),
    internalEnergy: out('specificEnthalpy', 'Specific internal energy'),
    specificVolume: out({ symbol: 'm3/kg', label: 'm³/kg' }, 'Specific volume'),
    density: out({ symbol: 'kg/m3', label: 'kg/m³' }, 'Density'),
    heatCapacity: out(
      'specificHeatCapacity',
      'Isobaric specific heat capacity (single phase only)',
    ).optional(),
    isochoricHeatCapacity: out(
      'specificHeatCapacity',
      'Isochoric specific heat capacity (single phase only)',
    ).optional(),
    speedOfSound: out({ symbol: 'm/s', label: 'm/s' }, 'Speed of sound (single phase only)').optional(),
    viscosity: out({ symbol: 'Pa*s', label: 'Pa·s' }, 'Dynamic viscosity (single phase only)').optional(),
    thermalConductivity: out(
      { symbol: 'W/(m*K)', label: 'W/(m·K)' },
      'Thermal conductivity (single phase only)',
    ).optional(),
    quality: out({ symbol: '1', label: 'vapour mass fraction 0–1' }, 'Quality (two-phase only)').optional(),
    provenance: ProvenanceSchema,
  })
  .meta({ id: 'SteamStateResponse' });
export type SteamStateResponse = z.infer<typeof SteamStateResponseSchema>;
