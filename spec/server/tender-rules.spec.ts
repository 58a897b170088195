import { isLiveBid, isSealed, statusesBefore, TENDER_STATUSES, TENDER_TRANSITIONS } from '@shared/tenders';

// The procedure's order as DESIGN.md states it ("The states"): draft → open → closed → awarded → notified;
// a draft or open tender may be cancelled (issue 13), and a cancelled one goes nowhere.
describe('the tender and bid rules shared by server and client (shared/tenders.ts)', () => {
  it('lets a tender move only forward, one step at a time, from draft to notified, or to cancelled before closing', () => {
    expect(statusesBefore('open')).toEqual(['draft']);
    expect(statusesBefore('closed')).toEqual(['open']);
    expect(statusesBefore('awarded')).toEqual(['closed']);
    expect(statusesBefore('notified')).toEqual(['awarded']);
    expect(statusesBefore('draft')).toEqual([]);
    expect(statusesBefore('cancelled')).toEqual(['draft', 'open']);
    expect(TENDER_TRANSITIONS.cancelled).toEqual([]);
    // No way back: no status is reachable from itself.
    const reachable = (from: string, seen = new Set<string>()): Set<string> => {
      for (const to of TENDER_TRANSITIONS[from as keyof typeof TENDER_TRANSITIONS]) if (!seen.has(to)) { seen.add(to); reachable(to, seen); }
      return seen;
    };
    expect(TENDER_STATUSES.filter((s) => reachable(s).has(s))).toEqual([]);
  });

  it('keeps bids sealed while the tender is a draft or open, and for ever once cancelled', () => {
    expect(TENDER_STATUSES.filter(isSealed)).toEqual(['draft', 'open', 'cancelled']);
  });

  it('counts a bid once it is submitted or submitted again, not as a draft or once withdrawn', () => {
    expect((['draft', 'submitted', 'revised', 'withdrawn'] as const).filter(isLiveBid)).toEqual(['submitted', 'revised']);
  });
});
