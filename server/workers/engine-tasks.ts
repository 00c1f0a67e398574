/**
 * The engine's heavy calculations as tasks of plain data, keyed by operation id: what a worker
 * thread (./engine-worker.ts) or the main thread (inline) runs for the HTTP layer. A task's input
 * is the request already in SI with its liquor as a {@link LiquorReference}; its result is the
 * engine's own plain result object; an engine error comes back as {@link SerializedError} data
 * and is rebuilt as the same typed error by {@link reviveError}, so the edge maps it to the same
 * problem whichever thread ran it. HTTP-free: this module imports only the engine.
 *
 * A U estimated at each effect's state is a function too: it crosses as {@link CoefficientData}
 * (the estimate's inputs in SI with the request field its messages name) and the task rebuilds it
 * with `overallCoefficientProvider` beside the liquor, so it calls the same correlations with the
 * same numbers in either thread.
 *
 * A new heavy operation (a sweep, a study) adds its entry to {@link engineTasks} and declares
 * `engine: { task: '<its id>', … }` on its /v1 declaration.
 */
import {
  EngineInputError,
  EngineNoSolutionError,
  EngineRangeError,
  type ValidRange,
} from '../engine/errors.js';
import type { SteamSupplySpec } from '../engine/evaporators/common.js';
import {
  designMultipleEffect,
  rateMultipleEffect,
  type MultipleEffectInput,
  type MultipleEffectResult,
} from '../engine/evaporators/multiple-effect.js';
import {
  designSingleEffect,
  rateSingleEffect,
  type SingleEffectDesignInput,
  type SingleEffectRatingInput,
  type SingleEffectResult,
} from '../engine/evaporators/single-effect.js';
import {
  overallCoefficientProvider,
  type OverallCoefficientEstimateSpec,
  type OverallCoefficientProvider,
} from '../engine/heat-transfer/overall.js';
import { liquorFromDescription, type LiquorReference } from '../engine/liquors/description.js';
import type { LiquorModel } from '../engine/liquors/model.js';
import { operationCatalogue } from '../../shared/operations.js';

export type { LiquorReference } from '../engine/liquors/description.js';

type WithoutLiquor<T> = Omit<T, 'liquor'> & { liquor: LiquorReference };

/**
 * U of an effect as plain data: W/(m²·K), or an estimate's own inputs (SI) with the request field
 * (`body.overallHeatTransferCoefficient`, `overallHeatTransferCoefficients[2]`) and the label
 * ("effect 3") its refusals and warnings carry, as `overallCoefficientProvider` takes them.
 */
export type CoefficientData =
  number | { estimate: OverallCoefficientEstimateSpec; field: string; label?: string };

/** U as the engine takes it: the number, or the provider rebuilt from its data. */
export function coefficientFromData(
  liquor: LiquorModel,
  u: CoefficientData,
): number | OverallCoefficientProvider {
  return typeof u === 'number' ? u : overallCoefficientProvider(liquor, u.estimate, u.field, u.label);
}

/** A single-effect spec with the liquor and the body's U as data. */
type SingleEffectSpec<T extends { body: { overallHeatTransferCoefficient: unknown } }> = Omit<
  WithoutLiquor<T>,
  'body'
> & {
  body: Omit<T['body'], 'overallHeatTransferCoefficient'> & {
    overallHeatTransferCoefficient: CoefficientData;
  };
};

/** A single effect: design (no area) or rating (area given). */
export type SingleEffectTask =
  | { mode: 'design'; spec: SingleEffectSpec<SingleEffectDesignInput> }
  | { mode: 'rating'; spec: SingleEffectSpec<SingleEffectRatingInput> };

/** A multiple-effect train: equal-area design, or rating of given areas. */
export interface MultipleEffectTask {
  mode: 'design' | 'rating';
  spec: Omit<WithoutLiquor<Omit<MultipleEffectInput, 'mode'>>, 'overallHeatTransferCoefficients'> & {
    steam: SteamSupplySpec;
    overallHeatTransferCoefficients: readonly CoefficientData[];
  };
}

// Tasks are keyed by the catalogue's operation ids (shared/operations.ts spells them).
export const SINGLE_EFFECT = operationCatalogue.singleEffect.id;
const MULTIPLE_EFFECT = operationCatalogue.multipleEffect.id;

/** Operation id → its input and result types. */
export interface EngineTaskTypes {
  [SINGLE_EFFECT]: { input: SingleEffectTask; result: SingleEffectResult };
  [MULTIPLE_EFFECT]: { input: MultipleEffectTask; result: MultipleEffectResult };
}

export type EngineTaskName = keyof EngineTaskTypes;

export const engineTasks: {
  [K in EngineTaskName]: (input: EngineTaskTypes[K]['input']) => EngineTaskTypes[K]['result'];
} = {
  [SINGLE_EFFECT]: (t) => {
    const liquor = liquorFromDescription(t.spec.liquor);
    const u = coefficientFromData(liquor, t.spec.body.overallHeatTransferCoefficient);
    return t.mode === 'design'
      ? designSingleEffect({ ...t.spec, liquor, body: { ...t.spec.body, overallHeatTransferCoefficient: u } })
      : rateSingleEffect({ ...t.spec, liquor, body: { ...t.spec.body, overallHeatTransferCoefficient: u } });
  },
  [MULTIPLE_EFFECT]: (t) => {
    const liquor = liquorFromDescription(t.spec.liquor);
    const input = {
      ...t.spec,
      liquor,
      overallHeatTransferCoefficients: t.spec.overallHeatTransferCoefficients.map((u) =>
        coefficientFromData(liquor, u),
      ),
    };
    return t.mode === 'rating' ? rateMultipleEffect(input) : designMultipleEffect(input);
  },
};

/** An engine error as data (the typed errors' fields; anything else by name and message). */
export interface SerializedError {
  name: string;
  message: string;
  field?: string;
  value?: number;
  validRange?: ValidRange;
  context?: string;
  reason?: string;
  detail?: EngineNoSolutionError['detail'];
}

/** The outcome of one case of a task: the engine's result, or its error as data. */
export type TaskOutcome<R = unknown> = { ok: true; value: R } | { ok: false; error: SerializedError };

export function serializeError(err: unknown): SerializedError {
  if (err instanceof EngineRangeError) {
    return {
      name: 'EngineRangeError',
      message: err.message,
      field: err.field,
      value: err.value,
      validRange: err.validRange,
      ...(err.context !== undefined ? { context: err.context } : {}),
      ...(err.reason !== undefined ? { reason: err.reason } : {}),
    };
  }
  if (err instanceof EngineInputError)
    return { name: 'EngineInputError', message: err.message, field: err.field };
  if (err instanceof EngineNoSolutionError) {
    return { name: 'EngineNoSolutionError', message: err.message, detail: err.detail };
  }
  const e = err instanceof Error ? err : new Error(String(err));
  return { name: e.name, message: e.message };
}

/** The typed error that {@link serializeError} described. */
export function reviveError(s: SerializedError): Error {
  switch (s.name) {
    case 'EngineRangeError':
      return new EngineRangeError(
        s.field ?? '',
        s.value ?? NaN,
        s.validRange!,
        s.message,
        s.context,
        s.reason,
      );
    case 'EngineInputError':
      return new EngineInputError(s.field ?? '', s.message);
    case 'EngineNoSolutionError':
      return new EngineNoSolutionError(s.message, s.detail);
    default: {
      const e = new Error(s.message);
      e.name = s.name;
      return e;
    }
  }
}

/** What the pool sends a worker thread: one task's name and some of its cases. */
export interface EngineWorkerTask {
  name: string;
  inputs: unknown[];
}

/** Runs every input of one task here, each to its own outcome (one failing case fails only itself). */
export function runEngineTasks(name: string, inputs: readonly unknown[]): TaskOutcome[] {
  if (!Object.hasOwn(engineTasks, name)) throw new Error(`unknown engine task "${name}"`);
  const run = engineTasks[name as EngineTaskName] as (input: unknown) => unknown;
  return inputs.map((input) => {
    try {
      return { ok: true, value: run(input) };
    } catch (err) {
      return { ok: false, error: serializeError(err) };
    }
  });
}
