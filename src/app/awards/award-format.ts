/**
 * How the award screens write numbers, times and digests: always in the viewer's locale and
 * time zone, amounts in the tender's currency (numbers: ui/number-format.ts).
 */

import { fractionPercent } from '../ui/number-format';

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
