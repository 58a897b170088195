/** A value for SQL LIKE/ILIKE taken literally: `%`, `_` and `\` lose their wildcard meaning. */
export function escapeLike(value: string): string {
  return value.replace(/[\\%_]/g, (c) => `\\${c}`);
}
