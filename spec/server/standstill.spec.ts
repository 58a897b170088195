import { addDays, holidaysOf, localDate, standstillEnd } from '../../server/services/standstill';

/**
 * The standstill end against published calendars. Each case names its calendar and year; where a
 * date comes from memory it says so, and it is cross-checked with date-holidays' own output (the
 * package the server uses), so a wrong memory and a wrong package would both show.
 */
const DUBLIN = 'Europe/Dublin';
const end = (approvedAt: string, days: number, closureDays: string[] = [], country: string | null = 'IE', timeZone = DUBLIN) =>
  standstillEnd({ approvedAt: new Date(approvedAt), days, timeZone, country, closureDays });

describe('Ireland 2026 public holidays as date-holidays gives them', () => {
  // From memory (Irish public holidays 2026): St Patrick's Day Tuesday 17 March; Easter Sunday is
  // 5 April 2026, so Easter Monday is 6 April; the October holiday is the last Monday, 26 October;
  // Christmas Day Friday 25 December, St Stephen's Day Saturday 26 December.
  const ie2026 = holidaysOf('IE', [2026]);
  test.each([
    ['2026-03-17', 'St. Patrick’s Day'],
    ['2026-04-06', 'Easter Monday'],
    ['2026-10-26', 'Last Monday in October'],
    ['2026-12-25', 'Christmas Day'],
    ['2026-12-26', 'St. Stephen’s Day'],
  ])('%s is %s', (date, name) => {
    expect(ie2026.get(date)).toBe(name);
  });
  test('an ordinary working day is not a holiday (Wednesday 18 March 2026)', () => {
    expect(ie2026.has('2026-03-18')).toBe(false);
  });
});

describe('standstill end, buying body in Ireland, procedure in Europe/Dublin', () => {
  test('a plain case: approved Monday 2 March 2026 + 10 days ends Thursday 12 March 2026 at 23:59 GMT', () => {
    const r = end('2026-03-02T10:00:00Z', 10);
    expect({ lastDay: r.lastDay, endsAt: r.endsAt.toISOString(), skipped: r.skipped }).toEqual({ lastDay: '2026-03-12', endsAt: '2026-03-12T23:59:00.000Z', skipped: [] });
  });

  test('ending on a holiday (Ireland 2026, St Patrick’s Day, Tuesday 17 March): moved to Wednesday 18 March, 23:59 GMT', () => {
    const r = end('2026-03-03T11:30:00Z', 14);
    expect({ lastDay: r.lastDay, endsAt: r.endsAt.toISOString(), skipped: r.skipped }).toEqual({
      lastDay: '2026-03-18', endsAt: '2026-03-18T23:59:00.000Z', skipped: [{ date: '2026-03-17', reason: 'St. Patrick’s Day' }],
    });
  });

  test('ending on a Saturday (Saturday 14 November 2026): moved past the weekend to Monday 16 November, 23:59 GMT', () => {
    const r = end('2026-11-04T09:00:00Z', 10);
    expect({ lastDay: r.lastDay, endsAt: r.endsAt.toISOString(), skipped: r.skipped.map((s) => s.reason) }).toEqual({
      lastDay: '2026-11-16', endsAt: '2026-11-16T23:59:00.000Z', skipped: ['Saturday', 'Sunday'],
    });
  });

  test('Easter 2026 in Ireland and the week summer time starts (Sunday 29 March): counted on the calendar, ends Tuesday 7 April at 23:59 IST = 22:59 UTC', () => {
    // Approved Wednesday 25 March (GMT) + 12 days = Monday 6 April, Easter Monday (from memory), so
    // Tuesday 7 April; by then Dublin is on summer time (UTC+1, from memory: last Sunday of March).
    const r = end('2026-03-25T15:00:00Z', 12);
    expect({ lastDay: r.lastDay, endsAt: r.endsAt.toISOString(), skipped: r.skipped }).toEqual({
      lastDay: '2026-04-07', endsAt: '2026-04-07T22:59:00.000Z', skipped: [{ date: '2026-04-06', reason: 'Easter Monday' }],
    });
  });

  test('the week summer time ends (Sunday 25 October 2026) and the October holiday (Monday 26 October): ends Tuesday 27 October, 23:59 GMT', () => {
    const r = end('2026-10-15T08:00:00Z', 11);
    expect({ lastDay: r.lastDay, endsAt: r.endsAt.toISOString(), skipped: r.skipped }).toEqual({
      lastDay: '2026-10-27', endsAt: '2026-10-27T23:59:00.000Z', skipped: [{ date: '2026-10-26', reason: 'Last Monday in October' }],
    });
  });

  test('Christmas 2026 in Ireland: Friday 25 December, then the weekend and the St Stephen’s Day substitute (Monday 28 December, a bank holiday): ends Tuesday 29 December', () => {
    const r = end('2026-12-15T12:00:00Z', 10);
    expect({ lastDay: r.lastDay, endsAt: r.endsAt.toISOString(), skipped: r.skipped.map((s) => s.date) }).toEqual({
      lastDay: '2026-12-29', endsAt: '2026-12-29T23:59:00.000Z', skipped: ['2026-12-25', '2026-12-26', '2026-12-27', '2026-12-28'],
    });
  });

  test('a closure day the buyer entered (Tuesday 29 December 2026) moves the Christmas case one more day, to Wednesday 30 December', () => {
    const r = end('2026-12-15T12:00:00Z', 10, ['2026-12-29']);
    expect({ lastDay: r.lastDay, last: r.skipped.at(-1) }).toEqual({ lastDay: '2026-12-30', last: { date: '2026-12-29', reason: 'closure day of the buying body' } });
  });

  test('days are counted from the approval’s date in the procedure’s zone, not in UTC: 23:30 UTC on 30 June is 1 July in Dublin', () => {
    expect(localDate(new Date('2026-06-30T23:30:00Z'), DUBLIN)).toBe('2026-07-01');
    const r = end('2026-06-30T23:30:00Z', 10);
    // 1 July + 10 = Saturday 11 July → Monday 13 July, 23:59 IST.
    expect({ lastDay: r.lastDay, endsAt: r.endsAt.toISOString() }).toEqual({ lastDay: '2026-07-13', endsAt: '2026-07-13T22:59:00.000Z' });
  });

  test('zero days (with an exemption ground, checked on the tender) end the standstill at the approval itself', () => {
    const r = end('2026-05-06T10:00:00Z', 0);
    expect({ lastDay: r.lastDay, endsAt: r.endsAt.toISOString() }).toEqual({ lastDay: '2026-05-06', endsAt: '2026-05-06T10:00:00.000Z' });
  });
});

describe('other calendars', () => {
  test('Germany 2026 (national holidays; from memory Whit Monday is 25 May 2026): a standstill ending then moves to Tuesday 26 May, 23:59 CEST = 21:59 UTC', () => {
    expect(holidaysOf('DE', [2026]).get('2026-05-25')).toBe('Pfingstmontag');
    const r = standstillEnd({ approvedAt: new Date('2026-05-15T09:00:00Z'), days: 10, timeZone: 'Europe/Berlin', country: 'DE', closureDays: [] });
    expect({ lastDay: r.lastDay, endsAt: r.endsAt.toISOString() }).toEqual({ lastDay: '2026-05-26', endsAt: '2026-05-26T21:59:00.000Z' });
  });

  test('a country the holiday package does not know still skips weekends', () => {
    const r = end('2026-11-04T09:00:00Z', 10, [], 'XX');
    expect(r.lastDay).toBe('2026-11-16');
  });

  test('date arithmetic crosses month and year ends', () => {
    expect([addDays('2026-12-30', 3), addDays('2028-02-28', 1)]).toEqual(['2027-01-02', '2028-02-29']);
  });
});
