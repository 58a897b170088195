import Holidays from 'date-holidays';
import { wallTimeToUtc } from '@shared/time-zone';

/**
 * The end of a tender's standstill period, computed once, in the approval's transaction, and stored
 * on the tender (`standstill_ends_at`); every letter then carries that stored end.
 *
 * Rule: the approval's calendar date in the procedure's time zone, plus the standstill days
 * (calendar days); if that day is not a working day of the buying body — a Saturday or Sunday, a
 * public or bank holiday of its country (the `date-holidays` package, whose data ships inside the
 * package: nothing is fetched), or one of the buyer's own closure days — the next working day; the
 * period ends at 23:59 local time that day. Bank holidays count as non-working too (Good Friday in
 * Ireland): a standstill that ends a day later than it must is never too short, one that ends on a
 * day the banks and many offices are shut could be challenged. Zero days (allowed only with a stated
 * exemption ground) end the standstill at the approval itself.
 */
export interface StandstillInput {
  /** The approval's instant. */
  approvedAt: Date;
  days: number;
  /** IANA zone of the procedure. */
  timeZone: string;
  /** ISO 3166-1 alpha-2 country of the buying body, if known. */
  country: string | null | undefined;
  /** The buyer's closure days, "YYYY-MM-DD". */
  closureDays: readonly string[];
}

export interface StandstillEnd {
  endsAt: Date;
  /** The last day of the standstill in the procedure's zone, "YYYY-MM-DD". */
  lastDay: string;
  /** Days skipped past the counted end, with why ("Saturday", "St. Patrick’s Day", "closure day"). */
  skipped: { date: string; reason: string }[];
}

const NON_WORKING_TYPES = new Set(['public', 'bank']);

/** The calendar date of an instant in a zone, "YYYY-MM-DD". */
export function localDate(instant: Date, timeZone: string): string {
  // en-CA writes dates as YYYY-MM-DD.
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(instant);
}

/** "2026-03-17" + n days (calendar arithmetic on the date alone, no zone involved). */
export function addDays(date: string, n: number): string {
  const t = new Date(`${date}T00:00:00Z`);
  t.setUTCDate(t.getUTCDate() + n);
  return t.toISOString().slice(0, 10);
}

/** Public and bank holidays of a country by date, from date-holidays ('' country or unknown: none). */
export function holidaysOf(country: string | null | undefined, years: number[]): Map<string, string> {
  const out = new Map<string, string>();
  if (!country) return out;
  // An unknown country gives no holidays (weekends and closure days still count).
  const calendar = new Holidays(country);
  for (const year of years) {
    for (const h of calendar.getHolidays(year) || []) {
      if (NON_WORKING_TYPES.has(h.type) && !out.has(h.date.slice(0, 10))) out.set(h.date.slice(0, 10), h.name);
    }
  }
  return out;
}

const WEEKDAY = ['Sunday', 'Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday'];

export function standstillEnd(input: StandstillInput): StandstillEnd {
  if (input.days <= 0) {
    return { endsAt: input.approvedAt, lastDay: localDate(input.approvedAt, input.timeZone), skipped: [] };
  }
  let day = addDays(localDate(input.approvedAt, input.timeZone), input.days);
  const year = Number(day.slice(0, 4));
  // A long run of closed days may cross into the next year.
  const holidays = holidaysOf(input.country, [year, year + 1]);
  const closed = new Set(input.closureDays);
  const skipped: StandstillEnd['skipped'] = [];
  for (;;) {
    const weekday = new Date(`${day}T00:00:00Z`).getUTCDay();
    const reason = weekday === 0 || weekday === 6 ? WEEKDAY[weekday] : holidays.get(day) ?? (closed.has(day) ? 'closure day of the buying body' : null);
    if (!reason) break;
    skipped.push({ date: day, reason });
    day = addDays(day, 1);
  }
  return { endsAt: new Date(wallTimeToUtc(`${day}T23:59`, input.timeZone)), lastDay: day, skipped };
}
