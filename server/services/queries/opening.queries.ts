import type { EntityManager } from '@mikro-orm/postgresql';
import { LIVE_BID_STATUSES } from '@shared/tenders';
import { sqlList } from '../sql';

/** The tender's fields the opening record and the flags at opening need. */
export interface OpeningTenderRow {
  reference: string;
  title: string;
  closes_at: Date | string;
  /** numeric, as PostgreSQL sends it. */
  abnormally_low_percent: string | number;
}

/** A bid received (live) or withdrawn at opening, with its vendor and its unit prices by region code. */
export interface OpeningBidRow {
  vendor_id: string;
  vendor_name: string;
  status: string;
  submitted_at: Date | string | null;
  updated_at: Date | string;
  revision: number;
  digest: string | null;
  /** numeric, as PostgreSQL sends it. */
  fixed_fee: string;
  prices: Record<string, string | number> | null;
}

export async function openingTender(tx: EntityManager, tenderId: string): Promise<OpeningTenderRow> {
  const [tender] = await tx.execute<OpeningTenderRow[]>(
    'select reference, title, closes_at, abnormally_low_percent from tender where id = ?', [tenderId],
  );
  return tender;
}

/** The live and the withdrawn bids, by vendor name. */
export async function openingBids(tx: EntityManager, tenderId: string): Promise<OpeningBidRow[]> {
  return tx.execute<OpeningBidRow[]>(
    `select o.id as vendor_id, o.name as vendor_name, b.status, b.submitted_at, b.updated_at, b.revision, b.digest, b.fixed_fee,
            (select json_object_agg(r.code, l.unit_price) from bid_line l join region r on r.id = l.region_id where l.bid_id = b.id) as prices
       from bid b join vendor_organisation o on o.id = b.vendor_organisation_id
      where b.tender_id = ? and b.status in (${sqlList([...LIVE_BID_STATUSES, 'withdrawn'])})
      order by o.name asc, o.id asc`,
    [tenderId],
  );
}

/** Stores the record once: a second closing of the same tender keeps the first. */
export async function insertOpeningRecord(tx: EntityManager, tenderId: string, content: unknown, digest: string): Promise<void> {
  await tx.execute(
    `insert into opening_record (id, created_at, updated_at, tender_id, content, digest) values (gen_random_uuid(), now(), now(), ?, ?::jsonb, ?)
     on conflict (tender_id) do nothing`,
    [tenderId, JSON.stringify(content), digest],
  );
}
