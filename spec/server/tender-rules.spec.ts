import { isLiveBid, isSealed, statusesBefore, TENDER_STATUSES, TENDER_TRANSITIONS } from '@shared/tenders';

// The procedure's order as DESIGN.md states it ("The states"): draft → open → closed → awarded → notified.
describe('the tender and bid rules shared by server and client (shared/tenders.ts)', () => {
  it('lets a tender move only forward, one step at a time, from draft to notified', () => {
    expect(statusesBefore('open')).toEqual(['draft']);
    expect(statusesBefore('closed')).toEqual(['open']);
    expect(statusesBefore('awarded')).toEqual(['closed']);
    expect(statusesBefore('notified')).toEqual(['awarded']);
    expect(statusesBefore('draft')).toEqual([]);
    // No way back: no status is reachable from itself.
    const reachable = (from: string, seen = new Set<string>()): Set<string> => {
      for (const to of TENDER_TRANSITIONS[from as keyof typeof TENDER_TRANSITIONS]) if (!seen.has(to)) { seen.add(to); reachable(to, seen); }
      return seen;
    };
    expect(TENDER_STATUSES.filter((s) => reachable(s).has(s))).toEqual([]);
  });

  it('keeps bids sealed exactly while the tender is a draft or open', () => {
    expect(TENDER_STATUSES.filter(isSealed)).toEqual(['draft', 'open']);
  });

  it('counts a bid once it is submitted or submitted again, not as a draft or once withdrawn', () => {
    expect((['draft', 'submitted', 'revised', 'withdrawn'] as const).filter(isLiveBid)).toEqual(['submitted', 'revised']);
  });
});
