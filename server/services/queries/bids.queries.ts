import type { EntityManager } from '@mikro-orm/postgresql';
import type { ComplianceDecision, ExclusionGround } from '@shared/compliance';
import { LIVE_BID_STATUSES, type TenderStatus } from '@shared/tenders';
import { sqlList } from '../sql';

/** What a bid save needs of its tender, read in the statement that holds the row FOR SHARE. */
export interface BiddingTenderRow {
  status: TenderStatus;
  reference: string;
  title: string;
  closes_at: Date | string;
  time_zone: string;
  published: boolean;
  /** Whether the vendor's organisation was invited. */
  invited: boolean;
  /** Region code → region id. */
  regions: Record<string, string> | null;
  /** The number of the latest amendment (0: none). */
  amendment: number;
}

/**
 * The tender as a bid save sees it, the row held FOR SHARE until the caller's transaction ends
 * (bids of many vendors proceed together; closing, which takes it FOR NO KEY UPDATE, waits for
 * them): one round trip for the status, the invitation of `vendorId`, the regions and the amendment.
 */
export async function biddingTenderForShare(tx: EntityManager, tenderId: string, vendorId: string): Promise<BiddingTenderRow | null> {
  const [row] = await tx.execute<BiddingTenderRow[]>(
    `select t.status, t.reference, t.title, t.closes_at, t.time_zone, t.published_at is not null as published,
            (select coalesce(max(a.number), 0)::int from amendment a where a.tender_id = t.id) as amendment,
            exists (select 1 from invitation i where i.tender_id = t.id and i.vendor_organisation_id = ?) as invited,
            (select json_object_agg(r.code, r.id) from region r where r.tender_id = t.id) as regions
       from tender t where t.id = ? for share`,
    [vendorId, tenderId],
  );
  return row ?? null;
}

/** A bid line to store: the region's id and the unit price. */
export interface BidLineInput {
  region_id: string;
  unit_price: number;
}

/**
 * Replaces the bid's lines with `lines` in one statement (upserts them, deletes the regions no
 * longer priced, and the prices kept for regions an amendment removed). The delete cannot see the
 * rows the upsert writes (one snapshot per statement), so it removes only regions no longer priced.
 */
export async function replaceBidLines(tx: EntityManager, bidId: string, lines: readonly BidLineInput[]): Promise<void> {
  await tx.execute(
    `with kept as (
       insert into bid_line (id, bid_id, region_id, unit_price)
       select gen_random_uuid(), ?, l.region_id, l.unit_price from jsonb_to_recordset(?::jsonb) as l(region_id uuid, unit_price numeric)
       on conflict (bid_id, region_id) do update set unit_price = excluded.unit_price, updated_at = now()
       returning region_id),
     removed as (delete from bid_removed_line where bid_id = ?)
     delete from bid_line where bid_id = ? and region_id not in (select region_id from kept)`,
    // JSON, not arrays: the query builder would spread an array into a list of parameters.
    [bidId, JSON.stringify(lines), bidId, bidId],
  );
}

/** A live bid of a closed tender as the tabulation reads it (numeric as text, as PostgreSQL sends it). */
export interface TabulationRow {
  id: string;
  vendor_id: string;
  vendor_name: string;
  sme: boolean;
  fixed_fee: string;
  capacity: string | null;
  submitted_at: Date | string;
  digest: string;
  nonce: string | null;
  revision: number;
  reference: string;
  document_id: string | null;
  /** Region code → unit price, in the tender's region order. */
  prices: Record<string, number | string> | null;
  /** Prices of regions an amendment removed after the bid was submitted. */
  removed: Record<string, number | string> | null;
  compliance_decision: ComplianceDecision | null;
  compliance_ground: ExclusionGround | null;
  compliance_note: string | null;
  compliance_decided_at: Date | string | null;
  low_price_explanation_requested_at: Date | string | null;
  low_price_accepted: boolean | null;
  low_price_note: string | null;
  low_price_decided_at: Date | string | null;
}

/** The tender's live bids with their lines, by vendor name: one statement, no entities. */
export async function tabulationRows(em: EntityManager, tenderId: string): Promise<TabulationRow[]> {
  return em.execute<TabulationRow[]>(
    `select b.id, o.id as vendor_id, o.name as vendor_name, o.sme, b.fixed_fee, b.capacity, b.submitted_at, b.digest, b.nonce, b.revision,
            (select t.reference from tender t where t.id = b.tender_id) as reference, b.document_id,
            (select json_object_agg(r.code, l.unit_price order by r.position)
               from bid_line l join region r on r.id = l.region_id where l.bid_id = b.id) as prices,
            (select json_object_agg(x.region_code, x.unit_price order by x.region_code) from bid_removed_line x where x.bid_id = b.id) as removed,
            b.compliance_decision, b.compliance_ground, b.compliance_note, b.compliance_decided_at,
            b.low_price_explanation_requested_at, b.low_price_accepted, b.low_price_note, b.low_price_decided_at
       from bid b join vendor_organisation o on o.id = b.vendor_organisation_id
      where b.tender_id = ? and b.status in (${sqlList(LIVE_BID_STATUSES)})
      order by o.name asc, o.id asc`,
    [tenderId],
  );
}
