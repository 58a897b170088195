import type { BidStatus, TenderStatus } from '@shared/tenders';

export const TENDER_STATUS_LABELS: Record<TenderStatus, string> = {
  draft: 'Draft',
  open: 'Open for bids',
  closed: 'Closed',
  awarded: 'Awarded',
  notified: 'Notices sent',
  contracted: 'Contracts recorded',
  cancelled: 'Cancelled',
};

export const BID_STATUS_LABELS: Record<BidStatus, string> = {
  draft: 'Draft saved',
  submitted: 'Submitted',
  revised: 'Revision submitted',
  withdrawn: 'Withdrawn',
};

