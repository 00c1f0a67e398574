/**
 * The last step of every calculation answer: a guard that refuses to send NaN or ±Infinity
 * (JSON would silently turn them into null), and the JSON writer.
 */
import type { Response } from 'express';
import { problem } from './problem.js';

/**
 * Path of the first non-finite number in a JSON-bound value ("effects[2].area", "(root)"), or
 * undefined if there is none. The walk builds no path strings on the way down: every calculation
 * answer and every batch row is checked, and nearly all of them are clean.
 */
export function findNonFinite(value: unknown): string | undefined {
  const segments = nonFiniteSegments(value);
  if (segments === undefined) return undefined;
  if (segments.length === 0) return '(root)';
  let path = '';
  for (const segment of segments) {
    path += typeof segment === 'number' ? `[${segment}]` : path ? `.${segment}` : segment;
  }
  return path;
}

/** The keys and indices down to the first non-finite number (innermost last), or undefined. */
function nonFiniteSegments(value: unknown): (string | number)[] | undefined {
  if (typeof value === 'number') return Number.isFinite(value) ? undefined : [];
  if (value === null || typeof value !== 'object') return undefined;
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const hit = nonFiniteSegments(value[i]);
      if (hit) return (hit.unshift(i), hit);
    }
    return undefined;
  }
  const record = value as Record<string, unknown>;
  for (const k in record) {
    if (!Object.hasOwn(record, k)) continue;
    const hit = nonFiniteSegments(record[k]);
    if (hit) return (hit.unshift(k), hit);
  }
  return undefined;
}

/**
 * The last step of every calculation route: refuses (422 'no-solution') to send a body holding
 * NaN or ±Infinity, which JSON would silently turn into null. Then writes the JSON itself, with
 * the headers `res.json` would set: `res.json` → `res.send` also parses the Content-Type to add
 * the charset and copies the string into a Buffer, work that showed in profiles of the metered
 * route and that a calculation answer never needs.
 */
export function sendCalculation(res: Response, body: unknown, status = 200): void {
  const bad = findNonFinite(body);
  if (bad !== undefined) {
    throw problem(
      'no-solution',
      `The calculation produced a non-finite number (${bad}); no result is returned.`,
    );
  }
  const text = JSON.stringify(body);
  res.statusCode = status;
  res.setHeader('Content-Type', 'application/json; charset=utf-8');
  // Stated even for HEAD, which sends no body (RFC 9110 §9.3.2: the same fields as GET).
  res.setHeader('Content-Length', Buffer.byteLength(text));
  res.end(text);
}
