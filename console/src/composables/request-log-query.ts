/**
 * The request log's query string, built in one place so the table, the paging and the CSV
 * export always agree: GET /console-api/request-log and /request-log/export.csv take the same
 * filters (shared/console/request-log.ts), the page adds paging and sorting.
 */
import { operationIdOf } from './operation-titles.js';
import type { Query } from '../api/client.js';

/** What the filter bar holds. Times are the values of <input type="datetime-local"> (local time). */
export interface RequestLogFilters {
  accountId: number | null;
  keyId: number | null;
  operation: string | null;
  /** An exact status ("404") or a class ("4xx"); empty for any. */
  status: string | null;
  /** "2031-03-14T10:00" in the browser's time zone, or empty. */
  from: string | null;
  to: string | null;
  requestId: string | null;
}

export function emptyFilters(): RequestLogFilters {
  return {
    accountId: null,
    keyId: null,
    operation: null,
    status: null,
    from: null,
    to: null,
    requestId: null,
  };
}

/** One entry of v-data-table-server's sort-by model. */
export interface SortItem {
  key: string;
  order?: boolean | 'asc' | 'desc';
}

/** Table column key → the server's sort field (RequestLogSortSchema). */
const SORT_FIELDS: Record<string, 'at' | 'latency' | 'status'> = {
  at: 'at',
  latencyMs: 'latency',
  status: 'status',
};

export interface Paging {
  page: number;
  pageSize: number;
  sortBy: readonly SortItem[];
}

/** A datetime-local value (local wall time) as an ISO 8601 instant in UTC, or undefined. */
export function localToInstant(value: string | null | undefined): string | undefined {
  if (!value) return undefined;
  const d = new Date(value);
  return Number.isNaN(d.getTime()) ? undefined : d.toISOString();
}

/** "4xx", "404" or "" → itself, trimmed and lower-cased; anything else is left for the server to refuse. */
function normaliseStatus(status: string | null): string | undefined {
  const s = status?.trim().toLowerCase();
  return s ? s : undefined;
}

/** The filters as query parameters (empty ones left out): used by the list and the export. */
export function filterQuery(f: RequestLogFilters): Query {
  return {
    accountId: f.accountId ?? undefined,
    keyId: f.keyId ?? undefined,
    operation: f.operation?.trim() ? operationIdOf(f.operation) : undefined,
    status: normaliseStatus(f.status),
    from: localToInstant(f.from),
    to: localToInstant(f.to),
    requestId: f.requestId?.trim() || undefined,
  };
}

/** Filters plus paging and sorting for GET /request-log. An unknown sort column falls back to time. */
export function pageQuery(f: RequestLogFilters, paging: Paging): Query {
  const first = paging.sortBy[0];
  const sort = (first && SORT_FIELDS[first.key]) ?? 'at';
  const order = first && first.order === 'asc' ? 'asc' : 'desc';
  return { ...filterQuery(f), page: paging.page, pageSize: paging.pageSize, sort, order };
}

/** Status class of an HTTP status code (RFC 9110 §15: the first digit), for chips and filters. */
export function statusClass(status: number): '1xx' | '2xx' | '3xx' | '4xx' | '5xx' | 'other' {
  const c = Math.floor(status / 100);
  return c >= 1 && c <= 5 ? (`${c}xx` as '1xx' | '2xx' | '3xx' | '4xx' | '5xx') : 'other';
}

/** A Vuetify colour for a status chip. */
export function statusColour(status: number): string {
  switch (statusClass(status)) {
    case '2xx':
      return 'success';
    case '3xx':
      return 'info';
    case '4xx':
      return 'warning';
    case '5xx':
      return 'error';
    default:
      return 'surface-variant';
  }
}

/**
 * A logged body for display: JSON is re-indented with two spaces, anything else (a truncated
 * body, CSV, plain text) is returned as it is. The result is shown as text, never as HTML.
 */
export function prettyBody(body: string | null): string | null {
  if (body === null) return null;
  try {
    return JSON.stringify(JSON.parse(body), null, 2);
  } catch {
    return body;
  }
}
