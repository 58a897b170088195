/**
 * How the award screens write numbers, times and digests: times in the procedure's zone, amounts in
 * the tender's currency (numbers: ui/number-format.ts).
 */

import { DEFAULT_TIME_ZONE, formatInZone } from '@shared/time-zone';
import { fractionPercent } from '../ui/number-format';

/**
 * The compare and resilience answers' ratios (cost of sole award, price over the split baseline,
 * increase without a vendor) are fractions too (0.0425 → "4.25%"); two decimals, because these
 * differences are often well under one per cent of a large total.
 */
export function percent(value: number, maximumFractionDigits = 2): string {
  return fractionPercent(value, maximumFractionDigits);
}

/**
 * Date and time to the second in the procedure's zone (DEFAULT_TIME_ZONE for the admin's screens),
 * in the one date-time format of shared/time-zone.ts, the zone named so a printout is unambiguous.
 */
export function localDateTime(iso: string, timeZone: string = DEFAULT_TIME_ZONE): string {
  return formatInZone(iso, timeZone, { seconds: true });
}

/** The first characters of a hex digest; the full value goes in a title attribute beside it. */
export function shortDigest(digest: string, length = 12): string {
  return digest.length > length ? `${digest.slice(0, length)}…` : digest;
}
