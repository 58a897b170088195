import type { Pool } from 'pg';
import { statusesAfter, type BidStatus, type TenderSort, type TenderStatus } from '@shared/tenders';
import { escapeLike } from '../like';
import { sqlList } from '../sql';
import { CURRENT_STATUS } from './tender-rows.queries';

/** The statuses in which a vendor sees the outcome only once its own letter is sent. */
export const AFTER_AWARD: TenderStatus[] = ['awarded', ...statusesAfter('awarded')];

/**
 * The status a vendor sees, over `tender t`, for the vendor in parameter `vendor` (`$n`): after the
 * award, `closed` until its own letter is sent (tenders.service.ts, `vendorStatus`, for one tender).
 */
const vendorStatus = (vendor: string) => `(case when ${CURRENT_STATUS} in (${sqlList(AFTER_AWARD)})
    and not exists (select 1 from notice n where n.tender_id = t.id and n.vendor_organisation_id = ${vendor} and n.status = 'sent')
  then 'closed'::tender_status else ${CURRENT_STATUS} end)`;

/** One row of `tenderListStatement`: what the list screen shows. */
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
  /** From the tender's row, kept by triggers on region (Migration20261209100000). */
  region_count: number;
  /** numeric, as PostgreSQL sends it: the sum of the forecasts (four decimals), `0` without regions. */
  total_forecast: string;
  /** The tender's own keys of its list entry as JSON, kept on its row (Migration20261211010000). */
  summary_json: string;
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
  /** 1-based. */
  page: number;
  size: number;
  sort: TenderSort;
  dir: 'asc' | 'desc';
}

/** The columns a list is ordered by, over alias `a`; the id last, so pages never overlap. */
function ordering(sort: TenderSort, dir: 'asc' | 'desc', a: string, status: string): string {
  const column = { closesAt: `${a}.closes_at`, reference: `${a}.reference`, title: `${a}.title`, status }[sort];
  // Closing time breaks ties of the other columns, newest first, as the list is read by default.
  return sort === 'closesAt' ? `${column} ${dir}, ${a}.id` : `${column} ${dir}, ${a}.closes_at desc, ${a}.id`;
}

/**
 * One page of the tender list in one statement, prepared once per connection and per shape of
 * filter and order (a named statement: PostgreSQL plans it once, not on every request), through the
 * pg pool rather than the ORM's query builder — the list is read on every visit of the list screen
 * by every vendor (bench:api, phases a and e). The count of all matching tenders comes with the
 * page (see `tenderListStatement`). A tender's count of regions and total forecast are read from its
 * own row (`region_count`, `total_forecast`: kept by PostgreSQL's triggers on region whenever regions
 * are written, Migration20261209100000), not counted and summed per listed tender. A buyer's list,
 * newest closing first, is read from the index `tender_created_by_id_closes_at_id_index` and stops
 * after the page; a vendor's from its invitations (see `matching`).
 *
 * PostgreSQL writes the page's items as the JSON the API answers (`tenderSummarySchema`: the same
 * keys, `closesAt` as JavaScript's `toISOString` writes it, numbers as numbers), and the route sends
 * that text as it is: parsing every row, its dates and numbers, mapping and serialising them again
 * was most of the web process's own work for a list (profiled, bench:api phases a and e). Each
 * entry is the tender's own keys as its row keeps them (`tender.summary_json`, written by a trigger,
 * Migration20261211010000) joined with its status as of now and the vendor's own bid's status:
 * building each entry with `json_agg` was most of PostgreSQL's CPU for a list.
 * `spec/server/tenders.spec.ts` checks the answer against the schema. Reads only, outside any transaction.
 */
export async function tenderListJson(pool: Pool, f: TenderListFilter): Promise<{ items: string; total: number }> {
  const [row] = (await pool.query<TenderListJsonRow>(tenderListJsonStatement(f))).rows;
  return tenderListPage(pool, f, row);
}

/** The row of `tenderListJsonStatement` (and of `vendorListWithSession`): the page's items as JSON, the count of all matches, the items on the page. */
export interface TenderListJsonRow {
  items: string;
  total: number;
  n: number;
}

/** The page of `row`, read by the statement for `f`; a vendor's page past the end is counted apart. */
export async function tenderListPage(pool: Pool, f: TenderListFilter, row: TenderListJsonRow): Promise<{ items: string; total: number }> {
  if (f.vendorOrganisationId && row.n === 0 && f.page > 1) {
    // A vendor's page past the end carries no row, so no count: counted apart (only then).
    return { items: '[]', total: (await pool.query<{ total: number }>(vendorCountStatement(f))).rows[0]?.total ?? 0 };
  }
  // A buyer's page past the end: the one row carries the count and no tender.
  return { items: row.items, total: row.total };
}

/** The texts of `tenderListJsonStatement` by name: one per shape of filter and order (at most 128). */
const jsonStatements = new Map<string, string>();

/**
 * The parameters of the list's statement, in the order `matching` and `tenderListStatement` number
 * them: vendor, owner, status, search, page size, offset (each filter only when set).
 */
function listValues(f: TenderListFilter, sid?: string): unknown[] {
  const values: unknown[] = [];
  if (f.vendorOrganisationId) values.push(sid ?? f.vendorOrganisationId);
  if (f.ownerId) values.push(f.ownerId);
  if (f.status) values.push(f.status);
  if (f.q) values.push(`%${escapeLike(f.q)}%`);
  values.push(f.size, (f.page - 1) * f.size);
  return values;
}

/**
 * `tenderListStatement` with its page written as a JSON array of `TenderSummary` (`tenderListJson`).
 * Its text is built once per name, not on every request (profiled, bench:api phase a); the first
 * time, the parameters `listValues` gives are checked against those the text was built with.
 */
export function tenderListJsonStatement(f: TenderListFilter): { name: string; text: string; values: unknown[] } {
  return jsonStatement(f, `tender-json-${shapeOf(f)}-${f.sort}-${f.dir}`);
}

/**
 * A vendor's page of `tenderListJsonStatement` read in the statement that reads the session
 * (`sessionForReadWith`, auth/session.queries.ts): the same text, with the vendor taken from the
 * session's row `s` — its person's organisation, and only if that person is a vendor (no tender
 * matches otherwise) — and the session id as `$1`. One round trip instead of two for the list a
 * vendor reloads most (bench:api phase a: each statement's round trip cost the web process
 * 100–150 µs of socket writes alone, profiled). `f.vendorOrganisationId` only has to be set (any
 * value): the vendor is the session's.
 */
export function vendorListWithSession(f: TenderListFilter, sid: string): { name: string; text: string; values: unknown[] } {
  if (!f.vendorOrganisationId) throw new Error('vendorListWithSession: a vendor\'s list only');
  return jsonStatement(f, `tender-json-session-${shapeOf(f)}-${f.sort}-${f.dir}`, sid);
}

/** The vendor in the list statement read with the session: the session person's organisation, if a vendor. */
const SESSION_VENDOR = `(case when s.role = 'vendor' then s.org_id end)`;

function jsonStatement(f: TenderListFilter, name: string, sid?: string): { name: string; text: string; values: unknown[] } {
  const values = listValues(f, sid);
  let text = jsonStatements.get(name);
  if (text === undefined) {
    const built = buildJsonStatement(f, sid === undefined ? undefined : SESSION_VENDOR);
    if (JSON.stringify(built.values) !== JSON.stringify(listValues(f))) {
      throw new Error(`tenderListJsonStatement: ${name} numbers its parameters unlike listValues`);
    }
    text = built.text;
    jsonStatements.set(name, text);
  }
  return { name, text, values };
}

function buildJsonStatement(f: TenderListFilter, vendorSql?: string): { name: string; text: string; values: unknown[] } {
  const page = tenderListStatement(f, vendorSql);
  // Each entry: the tender's own keys as its row keeps them (`summary_json`), then the status as of
  // now and, in a vendor's list, its own bid's status (enum labels: nothing to escape).
  const entry = `'{' || l.summary_json || ',"status":"' || l.status::text || '"'${
    f.vendorOrganisationId ? ` || ',"myBidStatus":' || coalesce('"' || l.my_bid_status::text || '"', 'null')` : ''} || '}'`;
  const text = `with l as (${page.text})
  select '[' || coalesce(string_agg(${entry}, ',' order by ${ordering(f.sort, f.dir, 'l', 'l.status')}) filter (where l.id is not null), '') || ']' as items,
         coalesce(max(l.total), 0)::int as total, count(l.id)::int as n
    from l`;
  return { name: page.name.replace(/^tender-page-/, 'tender-json-'), text, values: page.values };
}

/** The tender's columns a list reads (and filters and orders by), over `tender t`. */
const TENDER_COLUMNS = 't.id, t.reference, t.title, t.commodity, t.unit, t.currency, t.status, t.closes_at, t.time_zone, t.region_count, t.total_forecast, t.summary_json';

/** The text depends only on which filters are set, so that (and the order) names a statement. */
function shapeOf(f: TenderListFilter): string {
  return `${f.vendorOrganisationId ? 'v' : ''}${f.ownerId ? 'o' : ''}${f.status ? 's' : ''}${f.q ? 'q' : ''}`;
}

/** The filter of a list, over `tender t`, with its parameters (`$n`) and the status expression. */
function matching(f: TenderListFilter, vendorSql?: string) {
  const values: unknown[] = [];
  const param = (v: unknown) => `$${values.push(v)}`;
  const where: string[] = [];
  // With `vendorSql` (`vendorListWithSession`), `$1` is the session id and the vendor an expression.
  const vendor = f.vendorOrganisationId ? (vendorSql === undefined ? param(f.vendorOrganisationId) : (values.push(f.vendorOrganisationId), vendorSql)) : null;
  // A vendor's tenders are read from its invitations (one per tender and vendor, unique), each
  // tender by its primary key: the lateral subquery (its `limit 1` keeps PostgreSQL from flattening
  // it into a join) holds the plan to a nested loop over the vendor's few invitations. As a plain
  // join, the generic plan hashed them against a scan of every tender (1,077 on the bench data,
  // bench:api --explain): PostgreSQL's CPU per list about twice what it is now.
  if (vendor) where.push(`i.vendor_organisation_id = ${vendor}`);
  if (f.ownerId) where.push(`t.created_by_id = ${param(f.ownerId)}`);
  const status = vendor ? vendorStatus(vendor) : CURRENT_STATUS;
  if (f.status) where.push(`${status} = ${param(f.status)}::tender_status`);
  if (f.q) {
    const like = param(`%${escapeLike(f.q)}%`);
    where.push(`(t.reference ilike ${like} or t.title ilike ${like} or t.commodity ilike ${like})`);
  }
  const shape = shapeOf(f);
  const tables = vendor
    ? `invitation i cross join lateral (
        select ${TENDER_COLUMNS} from tender t where t.id = i.tender_id and t.status <> 'draft' and t.published_at is not null limit 1) t`
    : 'tender t';
  return { values, param, vendor, status, shape, from: `from ${tables} ${where.length ? `where ${where.join(' and ')}` : ''}` };
}

/** How many tenders a vendor's filter matches: only for a page past the end (`tenderListJson`). */
function vendorCountStatement(f: TenderListFilter): { name: string; text: string; values: unknown[] } {
  const m = matching(f);
  return { name: `tender-count-${m.shape}`, text: `select count(*)::int as total ${m.from}`, values: m.values };
}

/** One page of the list as rows; `tenderListJsonStatement` writes them as JSON (bench:api `--explain` shows its plan). */
export function tenderListStatement(f: TenderListFilter, vendorSql?: string): { name: string; text: string; values: unknown[] } {
  const { values, param, vendor, status, shape, from } = matching(f, vendorSql);
  const limit = param(f.size);
  const offset = param((f.page - 1) * f.size);
  const columns = `t.id, t.reference, t.title, t.commodity, t.unit, t.currency, ${status} as status, t.closes_at, t.time_zone, t.region_count, t.total_forecast, t.summary_json`;
  // A vendor's list runs its invitation filter once: the count of all matches is a window over
  // the same rows the page is cut from (a vendor is invited to few tenders, so all are sorted).
  // A buyer's, newest closing first, is read from the index and stops after the page; its count
  // (an uncorrelated subquery, run once, index-only) comes with the page even past the end.
  const page = vendor
    ? `(select ${columns}, count(*) over ()::int as total ${from}
         order by ${ordering(f.sort, f.dir, 't', status)} limit ${limit} offset ${offset}) p`
    : `(select count(*)::int as total ${from}) c
    left join lateral (
      select ${columns}
        ${from}
       order by ${ordering(f.sort, f.dir, 't', status)}
       limit ${limit} offset ${offset}) p on true`;
  // The vendor's own bid: a join, at most one row (one bid per tender and vendor, unique), read for
  // the page's tenders together rather than by a subquery per tender.
  const text = `select ${vendor ? 'p' : 'c'}.total, p.id, p.reference, p.title, p.commodity, p.unit, p.currency, p.status, p.closes_at, p.time_zone,
         p.region_count, p.total_forecast, p.summary_json,
         ${vendor ? 'b.status' : 'null'} as my_bid_status
    from ${page}${vendor ? `
    left join bid b on b.tender_id = p.id and b.vendor_organisation_id = ${vendor}` : ''}
   order by ${ordering(f.sort, f.dir, 'p', 'p.status')}`;
  return { name: `tender-page-${shape}-${f.sort}-${f.dir}`, text, values };
}
