/**
 * Operation ids for people: the catalogue's short titles (shared/operations.ts, plain data), so the
 * usage, overview and request-log views name "MVR evaporator" rather than a dotted id. An id the
 * catalogue does not know (an old row, `unmatched`) is shown as it is.
 */
import { operationCatalogue } from '../../../shared/operations.js';

const titles = new Map<string, string>(Object.values(operationCatalogue).map((op) => [op.id, op.title]));

/** The short title of an operation id, or the id itself when the catalogue does not know it. */
export function operationTitle(id: string): string {
  return titles.get(id) ?? id;
}

const idsByTitle = new Map<string, string>(
  Object.values(operationCatalogue).map((op) => [op.title.toLowerCase(), op.id]),
);

/** What a person typed in an operation filter, as the id the server filters by: a title is read as its id. */
export function operationIdOf(text: string): string {
  const t = text.trim();
  return idsByTitle.get(t.toLowerCase()) ?? t;
}

/** Choices for an operation filter: the title shown, the id sent. */
export function operationChoices(ids: readonly string[]): { title: string; value: string }[] {
  return ids.map((id) => ({ title: operationTitle(id), value: id }));
}
