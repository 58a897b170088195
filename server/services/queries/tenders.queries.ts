import type { Pool } from 'pg';
import { statusesAfter, type BidStatus, type TenderStatus } from '@shared/tenders';
import { escapeLike } from '../like';
import { sqlList } from '../sql';
import { CURRENT_STATUS } from '../tender-access';

/** The statuses in which a vendor sees the outcome only once its own letter is sent. */
export const AFTER_AWARD: TenderStatus[] = ['awarded', ...statusesAfter('awarded')];

/**
 * The status a vendor sees, over `tender t`, for the vendor in parameter `vendor` (`$n`): after the
 * award, `closed` until its own letter is sent (tenders.service.ts, `vendorStatus`, for one tender).
 */
const vendorStatus = (vendor: string) => `(case when ${CURRENT_STATUS} in (${sqlList(AFTER_AWARD)})
    and not exists (select 1 from notice n where n.tender_id = t.id and n.vendor_organisation_id = ${vendor} and n.status = 'sent')
  then 'closed'::tender_status else ${CURRENT_STATUS} end)`;

/** One row of a tender list: what the list screen shows, counted and summed by PostgreSQL. */
export interface TenderListRow {
  id: string;
  reference: string;
  title: string;
  commodity: string;
  unit: string;
  currency: string;
  /**
   * As of now: an open tender past its closing time reads `closed` until the close job closes it;
   * in a vendor's list, an awarded tender reads `closed` until that vendor's letter is sent.
   */
  status: TenderStatus;
  /** A Date from pg's own parser (a string if another parser was set for timestamptz). */
  closes_at: Date | string;
  time_zone: string;
  region_count: number;
  /** numeric, as PostgreSQL sends it. */
  total_forecast: string;
  /** The vendor's own bid's status (vendors' lists only; null when none). */
  my_bid_status: BidStatus | null;
}

export interface TenderListFilter {
  /** A vendor's list: published tenders its organisation was invited to, with its own bid's status. */
  vendorOrganisationId: string | null;
  /** A buyer's list: only the tenders this person created (tender-access.ts, `tenderOwnerScope`). */
  ownerId: string | null;
  status?: TenderStatus;
  q?: string;
}

/**
 * The tender list in one statement, prepared once per connection and per shape of filter (a named
 * statement: PostgreSQL plans it once, not on every request), through the pg pool rather than the
 * ORM's query builder — the list is read on every visit of the list screen by every vendor
 * (bench:api, phases a and e). Reads only, outside any transaction.
 */
export async function tenderListRows(pool: Pool, f: TenderListFilter): Promise<TenderListRow[]> {
  const values: unknown[] = [];
  const param = (v: unknown) => `$${values.push(v)}`;
  const where: string[] = [];
  const vendor = f.vendorOrganisationId ? param(f.vendorOrganisationId) : null;
  if (vendor) where.push(`t.status <> 'draft' and t.published_at is not null`, `exists (select 1 from invitation i where i.tender_id = t.id and i.vendor_organisation_id = ${vendor})`);
  if (f.ownerId) where.push(`t.created_by_id = ${param(f.ownerId)}`);
  const status = vendor ? vendorStatus(vendor) : CURRENT_STATUS;
  if (f.status) where.push(`${status} = ${param(f.status)}::tender_status`);
  if (f.q) {
    const like = param(`%${escapeLike(f.q)}%`);
    where.push(`(t.reference ilike ${like} or t.title ilike ${like} or t.commodity ilike ${like})`);
  }
  const text = `select t.id, t.reference, t.title, t.commodity, t.unit, t.currency, ${status} as status, t.closes_at, t.time_zone,
         coalesce(r.n, 0)::int as region_count, coalesce(r.total, 0) as total_forecast,
         ${vendor ? `(select b.status from bid b where b.tender_id = t.id and b.vendor_organisation_id = ${vendor})` : 'null'} as my_bid_status
    from tender t
    left join lateral (select count(*) as n, sum(forecast) as total from region where region.tender_id = t.id) r on true
   ${where.length ? `where ${where.join(' and ')}` : ''}
   order by t.closes_at desc, t.id`;
  // The text depends only on which filters are set, so that names the statement.
  const name = `tender-list-${vendor ? 'v' : ''}${f.ownerId ? 'o' : ''}${f.status ? 's' : ''}${f.q ? 'q' : ''}`;
  return (await pool.query<TenderListRow>({ name, text, values })).rows;
}
