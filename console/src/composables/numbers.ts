/** Counts (requests, units, quotas) in the browser's locale with its digit grouping: 12345 → "12,345" in en. */
const countFormat = new Intl.NumberFormat(undefined);

export function formatCount(n: number): string {
  return countFormat.format(n);
}
