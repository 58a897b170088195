import { Pipe, type PipeTransform } from '@angular/core';
import { DEFAULT_TIME_ZONE, formatInZone, type DateTimeOptions } from '@shared/time-zone';

/**
 * `{{ at | dateTime: tender.timeZone }}`: the one date-time format of shared/time-zone.ts ("Thu, 3 Dec
 * 2026, 15:32 CET (Europe/Berlin)"), in the procedure's zone; times of no procedure (outbox, the
 * admin's trail, account links) in DEFAULT_TIME_ZONE, named too. A missing time shows "—".
 */
@Pipe({ name: 'dateTime' })
export class DateTimePipe implements PipeTransform {
  transform(at: string | null | undefined, timeZone?: string | null, options?: DateTimeOptions): string {
    return at ? formatInZone(at, timeZone ?? DEFAULT_TIME_ZONE, options) : '—';
  }
}
