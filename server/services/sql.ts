/** Constants of shared/ (statuses) as SQL literals: `status in (${sqlList(LIVE_BID_STATUSES)})`. Never for input. */
export function sqlList(values: readonly string[]): string {
  return values.map((v) => `'${v.replace(/'/g, "''")}'`).join(', ');
}

/**
 * Ids as one PostgreSQL array parameter, for `where id = any(?::uuid[])` (a plain JS array would be
 * spread into several parameters by the query builder). Ids come from the database or are checked.
 */
export function uuidArray(ids: readonly string[]): string {
  return `{${ids.join(',')}}`;
}

/**
 * Texts as one PostgreSQL array parameter (`unnest(?::text[])`), each element quoted — so that a
 * code such as NULL stays text — with `"` and `\` escaped as the array syntax asks.
 */
export function textArray(values: readonly string[]): string {
  return `{${values.map((v) => `"${v.replace(/[\\"]/g, (c) => `\\${c}`)}"`).join(',')}}`;
}
