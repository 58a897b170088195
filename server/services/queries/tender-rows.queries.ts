import type { EntityManager } from '@mikro-orm/postgresql';
import type { TenderStatus } from '@shared/tenders';

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
