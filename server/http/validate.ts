/**
 * Validation → problem: parse a request part against its zod contract, or throw a 422
 * 'validation-failed' problem with one `errors` entry per issue, naming the dotted request path
 * (`feed.massFraction`, `overallHeatTransferCoefficients[2]`), the value and, where the contract
 * has one, the valid range in display units.
 */
import type { z } from 'zod';
import { CONTRACT_FIELD_HINTS, type ValidRangeDto } from '../../shared/contracts/index.js';
import { problem, type ProblemError, type ProblemFieldError } from './problem.js';

/** Dotted request path of a zod issue path: ['effects', 2, 'area'] → "effects[2].area". */
export function fieldPath(path: readonly PropertyKey[], prefix = ''): string {
  let out = prefix;
  for (const key of path) {
    if (typeof key === 'number') out += `[${key}]`;
    else out += out === '' ? String(key) : `.${String(key)}`;
  }
  return out;
}

function valueAt(input: unknown, path: readonly PropertyKey[]): unknown {
  let v: unknown = input;
  for (const key of path) {
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<PropertyKey, unknown>)[key];
  }
  return v;
}

/** JSON-safe echo of a received value (long strings and big objects are shortened). */
export function echo(value: unknown): unknown {
  if (value === undefined) return undefined;
  if (typeof value === 'string') return value.length > 80 ? `${value.slice(0, 80)}…` : value;
  if (typeof value === 'number') return Number.isFinite(value) ? value : String(value);
  if (typeof value === 'boolean' || value === null) return value;
  return Array.isArray(value) ? '(array)' : '(object)';
}

type Issue = z.core.$ZodIssue;

/** Errors that explain a likely mistake: listed first, so the problem's detail says them. */
const hints = new WeakSet<ProblemFieldError>();

/** For a failed union, the issues of the branch that got furthest (deepest path, then fewest issues). */
function bestUnionBranch(branches: Issue[][]): Issue[] {
  let best: Issue[] | undefined;
  let bestScore = -Infinity;
  for (const issues of branches) {
    const typeOnlyAtRoot = issues.every((i) => i.code === 'invalid_type' && i.path.length === 0);
    const depth = Math.max(0, ...issues.map((i) => i.path.length));
    const score = (typeOnlyAtRoot ? -100 : 0) + depth * 10 - issues.length;
    if (score > bestScore) {
      bestScore = score;
      best = issues;
    }
  }
  return best ?? [];
}

function issueToErrors(
  issue: Issue,
  basePath: readonly PropertyKey[],
  input: unknown,
  prefix: string,
): ProblemFieldError[] {
  const path = [...basePath, ...issue.path];
  if (issue.code === 'invalid_union' && issue.errors.length > 0) {
    return bestUnionBranch(issue.errors).flatMap((i) => issueToErrors(i, path, input, prefix));
  }
  if (issue.code === 'unrecognized_keys') {
    // A contract may explain a likely mistake: a message of its own, listed in CONTRACT_FIELD_HINTS.
    if (CONTRACT_FIELD_HINTS.has(issue.message)) {
      const hint = { field: fieldPath([...path, issue.keys[0] ?? ''], prefix), message: issue.message };
      hints.add(hint);
      return [hint];
    }
    return issue.keys.map((key) => ({
      field: fieldPath([...path, key], prefix),
      message: 'is not a field of this request',
    }));
  }
  const value = valueAt(input, path);
  const entry: ProblemFieldError = {
    field: fieldPath(path, prefix) || '(body)',
    message: issue.code === 'invalid_type' && value === undefined ? 'is required' : issue.message,
  };
  const shown = echo(value);
  if (shown !== undefined) entry.value = shown;
  const range = (issue as { params?: { validRange?: ValidRangeDto } }).params?.validRange;
  if (range) {
    entry.validRange = { min: range.min ?? -Infinity, max: range.max ?? Infinity, unit: range.unit };
  } else if (issue.code === 'too_small' && typeof issue.minimum === 'number' && issue.origin === 'number') {
    entry.validRange = { min: issue.minimum, max: Infinity, unit: '' };
  } else if (issue.code === 'too_big' && typeof issue.maximum === 'number' && issue.origin === 'number') {
    entry.validRange = { min: -Infinity, max: issue.maximum, unit: '' };
  }
  return [entry];
}

/** The problem for a failed zod parse. */
export function zodProblem(error: z.ZodError, input: unknown, prefix = ''): ProblemError {
  const all = error.issues.flatMap((i) => issueToErrors(i, [], input, prefix));
  const errors = [...all.filter((e) => hints.has(e)), ...all.filter((e) => !hints.has(e))].slice(0, 50);
  const first = errors[0];
  return problem(
    'validation-failed',
    first
      ? `${first.field}: ${first.message}${errors.length > 1 ? ` (and ${errors.length - 1} more)` : ''}`
      : undefined,
    { errors },
  );
}

/** Parses `input` with `schema`, or throws a 422 'validation-failed' ProblemError. */
export function validate<S extends z.ZodType>(schema: S, input: unknown, prefix = ''): z.output<S> {
  const result = schema.safeParse(input);
  if (!result.success) throw zodProblem(result.error, input, prefix);
  return result.data;
}
