/**
 * Times of a procedure in its own IANA time zone, with Intl alone (full ICU in Node.js 20 and
 * in browsers). Stored times are UTC instants; the editor enters wall-clock times of the zone.
 */

function parts(instant: number, timeZone: string): Record<string, number> {
  const fmt = new Intl.DateTimeFormat('en-GB', {
    timeZone, hourCycle: 'h23', year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', second: '2-digit',
  });
  const out: Record<string, number> = {};
  for (const p of fmt.formatToParts(new Date(instant))) if (p.type !== 'literal') out[p.type] = Number(p.value);
  return out;
}

/** Milliseconds the zone's wall clock is ahead of UTC at that instant (Dublin in summer: +3 600 000). */
function offsetAt(instant: number, timeZone: string): number {
  const p = parts(instant, timeZone);
  const wall = Date.UTC(p.year, p.month - 1, p.day, p.hour, p.minute, p.second);
  return wall - Math.floor(instant / 1000) * 1000;
}

/** "2026-12-12T12:00" in Europe/Dublin → its UTC ISO instant. A time skipped by a spring-forward change is taken one hour later. */
export function wallTimeToUtc(local: string, timeZone: string): string {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/.exec(local);
  if (!m) throw new RangeError(`Not a local date and time: ${local}`);
  const guess = Date.UTC(+m[1], +m[2] - 1, +m[3], +m[4], +m[5]);
  const first = guess - offsetAt(guess, timeZone);
  const second = guess - offsetAt(first, timeZone);
  // In a gap the two offsets disagree: the later instant shows the wall time moved forward.
  const instant = first === second ? first : Math.max(first, second);
  return new Date(instant).toISOString();
}

/** A UTC instant as the zone's wall time, "2026-12-12T12:00" (for a datetime-local input). */
export function utcToWallTime(iso: string, timeZone: string): string {
  const p = parts(new Date(iso).getTime(), timeZone);
  const two = (n: number) => String(n).padStart(2, '0');
  return `${p.year}-${two(p.month)}-${two(p.day)}T${two(p.hour)}:${two(p.minute)}`;
}

/**
 * The zone of times that belong to no procedure (the admin's trails, the outbox, account links):
 * the same default a new tender gets, and named wherever it is used.
 */
export const DEFAULT_TIME_ZONE = 'UTC';

export interface DateTimeOptions {
  /** false leaves the zone's IANA name out, for a column whose heading names it. */
  named?: boolean;
  /** Seconds too, where they matter (receipt times, audit entries, mail sent). */
  seconds?: boolean;
  /** Only the letters pass their own locale (month and weekday names); screens and e-mails use en-GB. */
  locale?: string;
}

/**
 * THE date-time format of Tendara, on every screen, e-mail, export and trail: "Thu, 3 Dec 2026,
 * 15:32 CET (Europe/Berlin)" — the wall time in the procedure's zone, its abbreviation or offset
 * (which tells the two 02:30s of an autumn night apart) and the zone's name; for UTC simply
 * "Thu, 3 Dec 2026, 15:32 UTC". Built from Intl's parts, so Node.js and every browser give the same
 * characters. The client uses it through the `dateTime` pipe, the e-mails through the `dateTime`
 * Handlebars helper. Machine formats (ISO 8601 in JSON, OCDS, file names) stay ISO.
 */
export function formatInZone(at: string | Date, timeZone: string, options: DateTimeOptions = {}): string {
  const { named = true, seconds = false, locale = 'en-GB' } = options;
  const p: Partial<Record<Intl.DateTimeFormatPartTypes, string>> = {};
  const fmt = new Intl.DateTimeFormat(locale, {
    timeZone, weekday: 'short', day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit',
    ...(seconds ? { second: '2-digit' } : {}), hourCycle: 'h23', timeZoneName: 'short',
  });
  for (const part of fmt.formatToParts(typeof at === 'string' ? new Date(at) : at)) if (part.type !== 'literal') p[part.type] = part.value;
  const time = `${p.hour}:${p.minute}${seconds ? `:${p.second}` : ''}`;
  const text = `${p.weekday}, ${p.day} ${p.month} ${p.year}, ${time} ${p.timeZoneName}`;
  return named && p.timeZoneName !== timeZone ? `${text} (${timeZone})` : text;
}
