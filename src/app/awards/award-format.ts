/**
 * How the award screens write numbers, times and digests: always in the viewer's locale and
 * time zone, amounts in the tender's currency.
 */

/** An amount in the tender's currency, e.g. €1,234,567.50; "1,234.50 XYZ" for a code Intl does not know. */
export function money(value: number, currency: string, maximumFractionDigits = 2): string {
  try {
    return new Intl.NumberFormat(undefined, { style: 'currency', currency, maximumFractionDigits }).format(value);
  } catch {
    return `${new Intl.NumberFormat(undefined, { maximumFractionDigits }).format(value)} ${currency}`;
  }
}

/** A quantity with digit grouping, e.g. 44,500. */
export function quantity(value: number): string {
  return new Intl.NumberFormat(undefined, { maximumFractionDigits: 3 }).format(value);
}

/** A fraction as a percentage: 0.2345 → "23.5%". */
export function fractionPercent(value: number, maximumFractionDigits = 1): string {
  return new Intl.NumberFormat(undefined, { style: 'percent', maximumFractionDigits }).format(value);
}

/**
 * The compare and resilience answers' ratios (cost of sole award, price over the split baseline,
 * increase without a vendor) are fractions too (0.0425 → "4.25%"); two decimals, because these
 * differences are often well under one per cent of a large total.
 */
export function percent(value: number, maximumFractionDigits = 2): string {
  return fractionPercent(value, maximumFractionDigits);
}

export const DATE_TIME: Intl.DateTimeFormatOptions = {
  year: 'numeric',
  month: 'short',
  day: 'numeric',
  hour: '2-digit',
  minute: '2-digit',
  second: '2-digit',
  timeZoneName: 'short',
};

/** Date and time in the viewer's own zone, with the zone named so a printout is unambiguous. */
export function localDateTime(iso: string): string {
  // dateStyle/timeStyle cannot be combined with timeZoneName, hence the separate fields.
  return new Intl.DateTimeFormat(undefined, DATE_TIME).format(new Date(iso));
}

/** The first characters of a hex digest; the full value goes in a title attribute beside it. */
export function shortDigest(digest: string, length = 12): string {
  return digest.length > length ? `${digest.slice(0, length)}…` : digest;
}
