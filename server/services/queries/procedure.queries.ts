import type { EntityManager } from '@mikro-orm/postgresql';
import { LIVE_BID_STATUSES } from '@shared/tenders';
import { sqlList, uuidArray } from '../sql';

/** An approved, active person of an organisation invited to a tender. */
export interface InvitedPersonRow {
  id: string;
  email: string;
  name: string;
  organisation: string;
  organisation_id: string;
}

/** A bid that had prices for regions an amendment removed: the codes of those regions. */
export interface RemovedPricesRow {
  bid_id: string;
  status: string;
  codes: string[];
}

/** Every approved, active person of every organisation invited to the tender, by organisation and e-mail. */
export async function invitedPeopleRows(em: EntityManager, tenderId: string): Promise<InvitedPersonRow[]> {
  return em.execute<InvitedPersonRow[]>(
    `select u.id, u.email, u.name, o.name as organisation, o.id as organisation_id
       from invitation i join vendor_organisation o on o.id = i.vendor_organisation_id
       join app_user u on u.vendor_organisation_id = o.id and u.active and u.role = 'vendor' and u.membership = 'approved'
      where i.tender_id = ? order by o.name, u.email`,
    [tenderId],
  );
}

/** The number the next answered question of the tender gets (1 for the first). */
export async function nextAnswerNumber(tx: EntityManager, tenderId: string): Promise<number> {
  const [next] = await tx.execute<{ n: number }[]>('select coalesce(max(number), 0)::int + 1 as n from question where tender_id = ?', [tenderId]);
  return next.n;
}

/** The number of the tender's last amendment (0 for none). */
export async function lastAmendmentNumber(tx: EntityManager, tenderId: string): Promise<number> {
  const [last] = await tx.execute<{ n: number }[]>('select coalesce(max(number), 0)::int as n from amendment where tender_id = ?', [tenderId]);
  return last.n;
}

/**
 * Keeps every price given for the regions about to be removed, with code and name, under the
 * amendment's number (a receipt commits to it); returns, per bid, the codes it had priced.
 */
export async function keepRemovedPrices(tx: EntityManager, amendmentNumber: number, regionIds: readonly string[]): Promise<RemovedPricesRow[]> {
  return tx.execute<RemovedPricesRow[]>(
    `with moved as (
       insert into bid_removed_line (id, bid_id, region_code, region_name, unit_price, amendment_number)
       select gen_random_uuid(), l.bid_id, r.code, r.name, l.unit_price, ? from bid_line l join region r on r.id = l.region_id
        where r.id = any(?::uuid[])
       on conflict (bid_id, region_code) do update set region_name = excluded.region_name, unit_price = excluded.unit_price, amendment_number = excluded.amendment_number
       returning bid_id, region_code)
     select m.bid_id, b.status, array_agg(m.region_code order by m.region_code) as codes from moved m join bid b on b.id = m.bid_id group by m.bid_id, b.status`,
    [amendmentNumber, uuidArray(regionIds)],
  );
}

/** Returns every live (submitted or revised) bid of the tender to draft (receipt and nonce cleared); their ids and revisions. */
export async function returnSubmittedBidsToDraft(tx: EntityManager, tenderId: string): Promise<{ id: string; revision: number }[]> {
  return tx.execute<{ id: string; revision: number }[]>(
    `update bid set status = 'draft', digest = null, nonce = null, version = version + 1, updated_at = now()
      where tender_id = ? and status in (${sqlList(LIVE_BID_STATUSES)}) returning id, revision`,
    [tenderId],
  );
}

export async function setAmendmentNote(tx: EntityManager, bidId: string, note: string): Promise<void> {
  await tx.execute('update bid set amendment_note = ? where id = ?', [note, bidId]);
}

/** The vendor organisations of the given bids. */
export async function bidOrganisations(em: EntityManager, bidIds: readonly string[]): Promise<string[]> {
  const rows = await em.execute<{ organisation_id: string }[]>('select vendor_organisation_id as organisation_id from bid where id = any(?::uuid[])', [uuidArray(bidIds)]);
  return rows.map((r) => r.organisation_id);
}
