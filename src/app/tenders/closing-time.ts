import { Signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { DEFAULT_TIME_ZONE, formatInZone } from '@shared/time-zone';
import { interval, map } from 'rxjs';

const MINUTE = 60_000;
const HOUR = 60 * MINUTE;
const DAY = 24 * HOUR;

/** "closes in 13 days 4 h", "closes in 3 h 20 min", "closes in 5 min" or "closed". */
export function timeLeft(closesAt: string, now: number): string {
  const left = new Date(closesAt).getTime() - now;
  if (!(left > 0)) return 'closed';
  const days = Math.floor(left / DAY);
  const hours = Math.floor((left % DAY) / HOUR);
  const minutes = Math.floor((left % HOUR) / MINUTE);
  if (days > 0) return `closes in ${days} ${days === 1 ? 'day' : 'days'} ${hours} h`;
  if (hours > 0) return `closes in ${hours} h ${minutes} min`;
  return minutes > 0 ? `closes in ${minutes} min` : 'closes in less than a minute';
}

/**
 * A time of the procedure in its zone, the zone named ("Tue, 1 Jul 2031, 12:00 GMT+1
 * (Europe/Dublin)"): the one date-time format (shared/time-zone.ts; templates use the `dateTime` pipe).
 */
export function localClosingTime(iso: string, timeZone: string = DEFAULT_TIME_ZONE, named = true): string {
  return formatInZone(iso, timeZone, { named });
}

export function hasClosed(closesAt: string, now: number): boolean {
  return new Date(closesAt).getTime() <= now;
}

/** The current time, refreshed every minute so "time left" counts down on an open page. */
export function minuteClock(): Signal<number> {
  return toSignal(interval(30_000).pipe(map(() => Date.now())), { initialValue: Date.now() });
}
