/**
 * How every screen writes numbers: in the viewer's locale, amounts in the tender's currency.
 * Formatters are made once per set of options and kept: creating an Intl.NumberFormat costs far
 * more than formatting with one, and a 30 × 200 bid tabulation formats thousands of prices.
 */
const formatters = new Map<string, Intl.NumberFormat>();

function formatter(options: Intl.NumberFormatOptions): Intl.NumberFormat {
  const key = JSON.stringify(options);
  let f = formatters.get(key);
  if (!f) {
    f = new Intl.NumberFormat(undefined, options);
    formatters.set(key, f);
  }
  return f;
}

/** An amount in the tender's currency, e.g. €1,234,567.50; "1,234.50 XYZ" for a code Intl does not know. */
export function money(value: number, currency: string, maximumFractionDigits = 2): string {
  try {
    return formatter({ style: 'currency', currency, maximumFractionDigits }).format(value);
  } catch {
    return `${formatter({ maximumFractionDigits }).format(value)} ${currency}`;
  }
}

/** A quantity with the viewer's digit grouping, e.g. 44,500. */
export function quantity(value: number): string {
  return formatter({ maximumFractionDigits: 3 }).format(value);
}

/** A fraction as a percentage: 0.2345 → "23.5%". */
export function fractionPercent(value: number, maximumFractionDigits = 1): string {
  return formatter({ style: 'percent', maximumFractionDigits }).format(value);
}
