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
 * "Sat 12 Dec 2026, 12:00 GMT (Europe/Dublin)": the time in the tender's zone, the zone named
 * (`named` false leaves the zone's name out, for a narrow column that names it below).
 */
export function formatInZone(iso: string, timeZone: string, locale = 'en-GB', named = true): string {
  const text = new Intl.DateTimeFormat(locale, {
    timeZone, weekday: 'short', day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', hourCycle: 'h23', timeZoneName: 'short',
  }).format(new Date(iso));
  return named ? `${text} (${timeZone})` : text;
}
