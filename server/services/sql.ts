/** Constants of shared/ (statuses) as SQL literals: `status in (${sqlList(LIVE_BID_STATUSES)})`. Never for input. */
export function sqlList(values: readonly string[]): string {
  return values.map((v) => `'${v.replace(/'/g, "''")}'`).join(', ');
}
