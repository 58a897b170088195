import type { EntityManager } from '@mikro-orm/postgresql';
import { LIVE_BID_STATUSES, type TenderStatus } from '@shared/tenders';
import { sqlList, uuidArray } from '../sql';

/** A region of a tender as plain values (no tracked entity): forecast is numeric, as PostgreSQL sends it. */
export interface RegionRow {
  code: string;
  name: string;
  forecast: string | number;
}

/** The tender's regions in their published order. */
export async function tenderRegionRows(em: EntityManager, tenderId: string): Promise<RegionRow[]> {
  return em.execute<RegionRow[]>('select code, name, forecast from region where tender_id = ? order by position', [tenderId]);
}

/**
 * The tender's status and closing time with the row held FOR SHARE until the caller's transaction
 * ends, as a bid holds it: a decision that takes it FOR NO KEY UPDATE (closing, cancelling,
 * amending, approving) waits for the caller, or the caller sees what that decision wrote.
 */
export async function tenderForShare(tx: EntityManager, tenderId: string): Promise<{ status: TenderStatus; closes_at: Date | string } | null> {
  const [row] = await tx.execute<{ status: TenderStatus; closes_at: Date | string }[]>('select status, closes_at from tender where id = ? for share', [tenderId]);
  return row ?? null;
}

/**
 * A tender's status as of now, in SQL over `tender t`: an open tender whose closing time has
 * passed is closed, whether or not the close job has written it yet. For reads that must not write.
 */
export const CURRENT_STATUS = `(case when t.status = 'open' and t.closes_at <= now() then 'closed'::tender_status else t.status end)`;

/** Which tenders a closing statement looks at: one (by id) or, with null, every tender. */
const which = (tenderId: string | null) => (tenderId === null ? { condition: 'true', params: [] } : { condition: 'id = ?', params: [tenderId] });

/** Whether the tender (or, with null, any tender) is open with its closing time at or before `cutoff`. */
export async function openTenderDue(em: EntityManager, tenderId: string | null, cutoff: Date): Promise<boolean> {
  const { condition, params } = which(tenderId);
  const [row] = await em.execute<{ due: boolean }[]>(
    `select exists (select 1 from tender where ${condition} and status = 'open' and closes_at <= ?) as due`, [...params, cutoff],
  );
  return row?.due === true;
}

/**
 * The ids of the open tenders due by `cutoff` (the one tender, or with null all), each row held
 * FOR NO KEY UPDATE until the caller's transaction ends, in id order (two closers cannot deadlock).
 * NO KEY UPDATE, as the update itself: it waits for bids (FOR SHARE) but not for audit entries
 * being appended (their foreign key takes KEY SHARE), which may hold the chain's lock.
 */
export async function lockDueTenders(tx: EntityManager, tenderId: string | null, cutoff: Date): Promise<string[]> {
  const { condition, params } = which(tenderId);
  const rows = await tx.execute<{ id: string }[]>(
    `select id from tender where ${condition} and status = 'open' and closes_at <= ? order by id for no key update`, [...params, cutoff],
  );
  return rows.map((r) => r.id);
}

/** A tender just closed, with its count of live bids (a bigint: PostgreSQL sends it as text). */
export interface ClosedTenderRow {
  id: string;
  bids: string;
}

/** Closes the tenders (closed at their closing time) and counts each one's live bids. */
export async function markTendersClosed(tx: EntityManager, tenderIds: readonly string[]): Promise<ClosedTenderRow[]> {
  return tx.execute<ClosedTenderRow[]>(
    `update tender set status = 'closed', closed_at = closes_at, updated_at = now()
       where id = any(?::uuid[])
       returning id, (select count(*) from bid where bid.tender_id = tender.id and bid.status in (${sqlList(LIVE_BID_STATUSES)})) as bids`,
    [uuidArray(tenderIds)],
  );
}

/** The tender's status and creator, the row held FOR NO KEY UPDATE until the caller's transaction ends (`lockTender`). */
export async function lockTenderRow(tx: EntityManager, tenderId: string): Promise<{ status: TenderStatus; created_by_id: string } | null> {
  const [row] = await tx.execute<{ status: TenderStatus; created_by_id: string }[]>(
    'select status, created_by_id from tender where id = ? for no key update', [tenderId],
  );
  return row ?? null;
}
