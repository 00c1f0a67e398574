/**
 * Mechanical vapour recompression: a single effect heated by its own compressed vapour. Design
 * (body.temperatureDifference or compressor.dischargePressure given: the area is found) or rating
 * (body.area given: the ΔT and discharge pressure are found). Engine fields are named like the
 * request's, so the field map is mostly the identity.
 */
import {
  MechanicalVaporRecompressionRequestSchema,
  MechanicalVaporRecompressionResponseSchema,
  type MechanicalVaporRecompressionResponse,
} from '../../../../shared/contracts/index.js';
import { operationCatalogue } from '../../../../shared/operations.js';
import {
  mechanicalVaporRecompression,
  mechanicalVaporRecompressionFiguresOfMerit,
} from '../../../engine/evaporators/mechanical-vapor-recompression.js';
import type { EngineWarning } from '../../../engine/types.js';
import { calculate, warningsOut, type FieldMap } from '../../engine-errors.js';
import { display, provenance, r } from '../../output.js';
import { declareOperation } from '../operation.js';
import { bodyEstimateCaseUnits, bodyEstimateUnits, estimateSources, figuresOut } from './evaporators.js';
import { coefficientInput, effectBreakdownOut, type EstimateInput } from './heat-transfer.js';
import { IF97_MODEL } from './steam.js';
import { bodyLiquor, streamOut } from './common.js';

const FIELDS: FieldMap = {
  pressure: 'body.pressure',
  productMassFraction: 'product.massFraction',
  massFraction: 'product.massFraction',
  // the liquor's own boiling-point rise: a result the BPR warning is about
  boilingPointRise: 'boilingPointRise',
  suctionPressureDrop: { path: 'suctionPressureDrop', kind: 'pressure' },
};

export const mechanicalVaporRecompressionOperation = declareOperation({
  operation: operationCatalogue.mechanicalVaporRecompression,
  method: 'post',
  path: '/v1/evaporators/mechanical-vapor-recompression',
  openApiName: 'postMechanicalVaporRecompression',
  tag: 'Evaporators',
  summary: 'Mechanical-vapour-recompression evaporator: compressor power, make-up steam or surplus, and area',
  description:
    'The vapour leaves the body at its pressure and the liquor boiling point, is compressed (IAPWS-IF97, ' +
    'isentropic efficiency per stage, equal pressure ratio per stage) and desuperheated with condensate, ' +
    'and condenses in the chest. Its heat is compared with the duty: make-up steam covers a shortfall, a ' +
    'trim condenser takes a surplus. ' +
    '`body.overallHeatTransferCoefficient` is a number, or `{ "estimate": { evaporatorType, tube, flow, fouling?, liquorProperties? } }`: U estimated at the solved state (product mass fraction, mean boiling temperature and pressure, the chest’s condensing temperature T_sat(p₂); in rating T_c and U are solved together by Brent). U and the area then refer to the OUTSIDE area of the tubes, and `heatTransfer` reports the estimate. ' +
    `An estimate costs ${operationCatalogue.overallCoefficient.units} units on top of the ${operationCatalogue.mechanicalVaporRecompression.units} of the calculation (in a batch too). ` +
    'Example: an invented seawater distiller at the Skerrow Point works.',
  request: {
    body: MechanicalVaporRecompressionRequestSchema,
    example: {
      summary: 'Skerrow Point seawater distiller (invented)',
      value: {
        liquor: 'seawater',
        feed: { massFlow: 20, massFraction: '42 g/kg', temperature: 58 },
        product: { massFraction: '70 g/kg' },
        body: { pressure: 20, overallHeatTransferCoefficient: 2400, temperatureDifference: 5 },
        compressor: { isentropicEfficiency: 0.75 },
      },
    },
  },
  response: {
    description: 'The evaporator and its compressor',
    schema: MechanicalVaporRecompressionResponseSchema,
  },
  loadAfterBody: true,
  load: bodyLiquor,
  run: ({ body: b, loaded: liquor }, ctx): MechanicalVaporRecompressionResponse => {
    const result = calculate(FIELDS, () => {
      const { massFraction: productFraction, massFlow: productFlow, enthalpy: productEnthalpy } = b.product;
      const { temperatureDifference, area, liquidHeight } = b.body;
      const c = b.compressor;
      return mechanicalVaporRecompression({
        liquor: liquor.model,
        feed: {
          massFlow: b.feed.massFlow,
          massFraction: b.feed.massFraction,
          temperature: b.feed.temperature,
          ...(b.feed.enthalpy !== undefined ? { enthalpy: b.feed.enthalpy } : {}),
        },
        product: {
          ...(productFraction !== undefined ? { massFraction: productFraction } : {}),
          ...(productFlow !== undefined ? { massFlow: productFlow } : {}),
          ...(productEnthalpy !== undefined ? { enthalpy: productEnthalpy } : {}),
        },
        body: {
          pressure: b.body.pressure,
          overallHeatTransferCoefficient: coefficientInput(
            liquor.model,
            b.body.overallHeatTransferCoefficient,
            'body.overallHeatTransferCoefficient',
          ),
          ...(temperatureDifference !== undefined ? { temperatureDifference } : {}),
          ...(area !== undefined ? { area } : {}),
          ...(liquidHeight !== undefined ? { liquidHeight } : {}),
        },
        compressor: {
          ...(c.isentropicEfficiency !== undefined ? { isentropicEfficiency: c.isentropicEfficiency } : {}),
          ...(c.driveEfficiency !== undefined ? { driveEfficiency: c.driveEfficiency } : {}),
          ...(c.dischargePressure !== undefined ? { dischargePressure: c.dischargePressure } : {}),
          ...(c.stages !== undefined ? { stages: c.stages } : {}),
          ...(c.maxPressureRatioPerStage !== undefined
            ? { maxPressureRatioPerStage: c.maxPressureRatioPerStage }
            : {}),
        },
        ...(b.heatLossFraction !== undefined ? { heatLossFraction: b.heatLossFraction } : {}),
        ...(b.makeUpSteam !== undefined ? { makeUpSteam: { pressure: b.makeUpSteam.pressure } } : {}),
        ...(b.suctionPressureDrop !== undefined ? { suctionPressureDrop: b.suctionPressureDrop } : {}),
      });
    });
    const k = result.compressor;
    // The figures, and their no-make-up-steam warning, only where they are reported.
    const figureWarnings: EngineWarning[] = [];
    const figures =
      (b.figuresOfMerit ?? liquor.model.id === 'seawater')
        ? figuresOut(
            mechanicalVaporRecompressionFiguresOfMerit(result, figureWarnings),
            true,
            liquor.model.id,
          )
        : {};
    return {
      mode: result.mode,
      compressor: {
        suctionPressure: display(k.suctionPressure, 'pressure'),
        dischargePressure: display(k.dischargePressure, 'pressure'),
        pressureRatio: r(k.pressureRatio),
        stagePressureRatio: r(k.stagePressureRatio),
        saturationTemperatureLift: r(k.saturationTemperatureLift),
        dischargeTemperature: display(k.dischargeTemperature, 'temperature'),
        stages: k.stages,
        shaftPower: display(k.shaftPower, 'power'),
        electricPower: display(k.electricPower, 'power'),
        desuperheatingWater: r(k.desuperheatingWater),
      },
      specificEnergy: display(result.specificEnergy, 'specificEnergy'),
      duty: display(result.duty, 'power'),
      temperatureDifference: r(result.temperatureDifference),
      area: r(result.area),
      boilingPointRise: r(result.boilingPointRise),
      feed: streamOut(result.feed),
      product: streamOut(result.product),
      vapor: {
        massFlow: r(result.vapor.massFlow),
        pressure: display(result.vapor.pressure, 'pressure'),
        temperature: display(result.vapor.temperature, 'temperature'),
        enthalpy: display(result.vapor.enthalpy, 'specificEnthalpy'),
      },
      makeUpSteam: {
        massFlow: r(result.makeUpSteam.massFlow),
        pressure: display(result.makeUpSteam.pressure, 'pressure'),
      },
      surplusVapor: { massFlow: r(result.surplusVapor.massFlow) },
      condensate: {
        massFlow: r(result.condensate.massFlow),
        temperature: display(result.condensingTemperature, 'temperature'),
      },
      heatLoss: display(result.heatLoss, 'power'),
      balances: result.balances,
      ...figures,
      ...(result.heatTransfer
        ? {
            heatTransfer: effectBreakdownOut(
              result.heatTransfer,
              { massFraction: result.product.massFraction, bodyPressure: result.body.meanBoilingPressure },
              (b.body.overallHeatTransferCoefficient as { estimate: EstimateInput }).estimate.tube,
            ),
          }
        : {}),
      warnings: warningsOut([...liquor.definitionWarnings, ...result.warnings, ...figureWarnings], FIELDS),
      cautions: result.cautions,
      provenance: provenance(ctx.engineVersion, [IF97_MODEL, ...liquor.models, ...estimateSources(result)]),
    };
  },
  extraUnits: bodyEstimateUnits,
  batch: { units: bodyEstimateCaseUnits(operationCatalogue.mechanicalVaporRecompression.units) },
});
