import type { BidStatus, TenderStatus } from '@shared/tenders';

export const TENDER_STATUS_LABELS: Record<TenderStatus, string> = {
  draft: 'Draft',
  open: 'Open for bids',
  closed: 'Closed',
  awarded: 'Awarded',
  notified: 'Notices sent',
};

export const BID_STATUS_LABELS: Record<BidStatus, string> = {
  draft: 'Draft saved',
  submitted: 'Submitted',
  revised: 'Revision submitted',
  withdrawn: 'Withdrawn',
};

/** A number with the viewer's digit grouping, e.g. 44,500. */
export function quantity(value: number): string {
  return new Intl.NumberFormat(undefined, { maximumFractionDigits: 3 }).format(value);
}

/** An amount in the tender's currency, e.g. €1,234.50. Falls back to "1,234.50 XYZ" for a code Intl does not know. */
export function money(value: number, currency: string, maximumFractionDigits = 2): string {
  try {
    return new Intl.NumberFormat(undefined, { style: 'currency', currency, maximumFractionDigits }).format(value);
  } catch {
    return `${new Intl.NumberFormat(undefined, { maximumFractionDigits }).format(value)} ${currency}`;
  }
}
