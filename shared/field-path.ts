/**
 * The one notation for a field in error lists, server and client: `regions[2].code`,
 * `vendors[0].prices.R07` — from a zod issue's path, with an optional prefix (`awardBasis`).
 */
export function fieldPath(path: readonly PropertyKey[], prefix = ''): string {
  return path.reduce<string>((acc, part) => (typeof part === 'number' ? `${acc}[${part}]` : acc ? `${acc}.${String(part)}` : String(part)), prefix);
}

/** A field path (`regions[3].forecast`, or a zod path) as an Angular form control path (`regions.3.forecast`). */
export function controlPath(field: string | readonly PropertyKey[]): string {
  return typeof field === 'string' ? field.replace(/\[(\d+)\]/g, '.$1') : field.map(String).join('.');
}
