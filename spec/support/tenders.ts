import type { TenderInputBody } from '@shared/tenders';
import { Tender } from '../../server/entities';
import { CLOSING_GRACE_MS } from '../../server/services/tender-access';
import type { Browser, TestApp } from './app';

let seq = 0;
/** A tender body with `n` regions R01…, closing in `minutes`. */
export function tenderBody(n = 3, minutes = 60, overrides: Partial<TenderInputBody> = {}): TenderInputBody {
  const locale = 'en-GB';
  seq += 1;
  return {
    reference: `T-${Date.now().toString(36)}-${seq}`,
    title: 'Gritting salt for the winter',
    commodity: 'Rock salt',
    unit: 't',
    currency: 'EUR',
    closesAt: new Date(Date.now() + minutes * 60_000).toISOString(),
    standstillDays: 10,
    locale,
    description: '',
    regions: Array.from({ length: n }, (_, i) => ({ code: `R${String(i + 1).padStart(2, '0')}`, name: `Depot ${i + 1}`, forecast: 1000 * (i + 1) })),
    // Publishing needs a buying body (fictional).
    buyingBody: { name: 'Northmoor Roads Authority', address: '1 Quay Street, Northmoor', email: 'tenders@northmoor.tendara.test', country: 'IE' },
    ...overrides,
  };
}

/** Creates, invites the given organisations to, and publishes a tender as `buyer`. */
export async function openTender(buyer: Browser, organisationIds: string[], body = tenderBody()): Promise<string> {
  const created = await buyer.post('/api/tenders', body);
  if (created.status !== 201) throw new Error(`create: ${created.status} ${JSON.stringify(created.body)}`);
  const id = created.body.id as string;
  const inv = await buyer.post(`/api/tenders/${id}/invitations`, { vendorOrganisationIds: organisationIds });
  if (inv.status !== 200) throw new Error(`invite: ${inv.status} ${JSON.stringify(inv.body)}`);
  const pub = await buyer.post(`/api/tenders/${id}/publish`);
  if (pub.status !== 200) throw new Error(`publish: ${pub.status} ${JSON.stringify(pub.body)}`);
  return id;
}

/**
 * Moves the closing time into the past, beyond the grace in which bids received before it are
 * still stored (as if the clock had run on) — the tender closes on next access.
 */
export async function passClosingTime(t: TestApp, tenderId: string): Promise<void> {
  await t.em().nativeUpdate(Tender, { id: tenderId }, { closesAt: new Date(Date.now() - CLOSING_GRACE_MS - 1000) });
}
