import type { EntityManager } from '@mikro-orm/postgresql';
import type { OpeningRecordContent } from '@shared/compliance';
import { digestOf } from './audit.service';
import { abnormallyLowFlags, isFlagged } from './evaluation/abnormally-low';
import { insertOpeningRecord, openingBids, openingTender } from './queries/opening.queries';
import { tenderRegionRows } from './queries/tender-rows.queries';

/** What the closing transaction writes into the `tender.closed` audit entry besides the count. */
export interface OpeningOutcome {
  openingRecordDigest: string;
  /** The first screen's flags at opening (no bid excluded yet): vendor, flagged regions, total flagged. */
  abnormallyLow: { vendor: string; regions: string[]; total: boolean }[];
}

/**
 * Inside the transaction that closes the tender (tender-access.ts `closeWhere`, the tender row
 * locked): writes the opening record — every bid received (vendor, time received, revision,
 * receipt) and every bid withdrawn (with when: the time the withdrawal was stored) — with the
 * SHA-256 of its canonical JSON, and computes the abnormally-low flags at opening. Plain rows: this
 * module must not import the bid service or tender-access (which imports it). The routes read the
 * record through opening-record.service.ts.
 */
export async function writeOpeningRecord(tx: EntityManager, tenderId: string, openedAt: Date): Promise<OpeningOutcome> {
  const tender = await openingTender(tx, tenderId);
  const bids = await openingBids(tx, tenderId);
  const live = bids.filter((b) => b.status !== 'withdrawn');
  const content: OpeningRecordContent = {
    tender: { id: tenderId, reference: tender.reference, title: tender.title },
    closesAt: new Date(tender.closes_at).toISOString(),
    openedAt: openedAt.toISOString(),
    bids: live.map((b) => ({
      vendor: { id: b.vendor_id, name: b.vendor_name }, receivedAt: new Date(b.submitted_at!).toISOString(), revision: b.revision, digest: b.digest ?? '',
    })),
    withdrawn: bids.filter((b) => b.status === 'withdrawn').map((b) => ({
      vendor: { id: b.vendor_id, name: b.vendor_name }, withdrawnAt: new Date(b.updated_at).toISOString(),
    })),
  };
  const digest = digestOf(content);
  await insertOpeningRecord(tx, tenderId, content, digest);
  const regions = await tenderRegionRows(tx, tenderId);
  const flags = abnormallyLowFlags(
    live.map((b) => ({
      vendor: b.vendor_id, excluded: false, fixedFee: Number(b.fixed_fee),
      prices: Object.fromEntries(Object.entries(b.prices ?? {}).map(([code, p]) => [code, Number(p)])),
    })),
    regions.map((r) => ({ code: r.code, forecast: Number(r.forecast) })),
    Number(tender.abnormally_low_percent),
  );
  const abnormallyLow = live.flatMap((b) => {
    const f = flags.get(b.vendor_id);
    return f && isFlagged(f) ? [{ vendor: b.vendor_id, regions: f.prices.map((p) => p.region), total: f.total !== null }] : [];
  });
  return { openingRecordDigest: digest, abnormallyLow };
}
