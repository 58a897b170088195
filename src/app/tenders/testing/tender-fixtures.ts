import type { TenderView } from '@shared/tenders';

/** Fictional test data shared by the tender screens' specs (and the award screens', which read a tender too). */

export const TENDER_UUID = '3a9d2c71-5e4b-4f10-9c2a-7b8e6d5f4a21';

export function tenderView(overrides: Partial<TenderView> = {}): TenderView {
  return {
    id: TENDER_UUID,
    reference: 'GRT-2027-014',
    title: 'Grit salt for the upland depots',
    commodity: 'Rock salt, 6 mm',
    unit: 't',
    currency: 'EUR',
    locale: 'en-GB',
    status: 'closed',
    closesAt: '2026-11-20T11:00:00Z',
    timeZone: 'Europe/Berlin',
    regionCount: 2,
    totalForecast: 7200,
    description: 'Winter stock for two depots.',
    standstillDays: 10,
    standstillExemption: null,
    closureDays: [],
    standstillEndsAt: null,
    publishedAt: '2026-11-01T09:00:00Z',
    closedAt: '2026-11-20T11:00:30Z',
    awardBasis: { sourcing: 'split', soleRegions: [] },
    buyingBody: null,
    bidValidityDays: 90,
    clarificationsCloseAt: '2026-11-15T11:00:00Z',
    abnormallyLowPercent: 20,
    amendments: [],
    cancellation: null,
    regions: [
      { code: 'R01', name: 'Cranby depot', forecast: 4200 },
      { code: 'R02', name: 'Wexcombe depot', forecast: 3000 },
    ],
    ...overrides,
  };
}
