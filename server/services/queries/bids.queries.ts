import type { EntityManager } from '@mikro-orm/postgresql';
import type { ClientBase, Pool } from 'pg';
import type { ComplianceDecision, ExclusionGround } from '@shared/compliance';
import { LIVE_BID_STATUSES, type BidStatus, type TenderStatus } from '@shared/tenders';
import type { BidDocumentFigures } from '../../entities/bid-document.entity';
import type { ReadWithSession } from '../../auth/session.queries';
import { sqlList, textArray } from '../sql';

/** The tender of a bid being saved or withdrawn, read under its row lock. */
export interface BiddingTenderRow {
  status: TenderStatus;
  reference: string;
  title: string;
  closes_at: Date | string;
  time_zone: string;
  published: boolean;
  /** Whether the vendor's organisation was invited. */
  invited: boolean;
}

/**
 * Locks the tender row FOR SHARE — bids of many vendors proceed together, while closing (FOR NO
 * KEY UPDATE) and every decision on the tender wait for them — and reads what the closing-time check
 * and the receipt need. The first statement of a bid's transaction; what may change under a
 * decision (regions, amendments) is read by the next statement, whose snapshot is taken once the
 * lock is held.
 */
export async function lockTenderForBid(tx: ClientBase, tenderId: string, vendorId: string): Promise<BiddingTenderRow | undefined> {
  const { rows: [row] } = await tx.query<BiddingTenderRow>({
    name: 'bid-lock-tender',
    text: `select t.status, t.reference, t.title, t.closes_at, t.time_zone, t.published_at is not null as published,
            exists (select 1 from invitation i where i.tender_id = t.id and i.vendor_organisation_id = $2) as invited
       from tender t where t.id = $1 for share`,
    values: [tenderId, vendorId],
  });
  return row;
}

/** The vendor's bid as it stands (all null when it has none), and what its save must check. */
export interface OwnBidRow {
  id: string | null;
  status: BidStatus | null;
  revision: number | null;
  version: number | null;
  /** The workbook asked for (or, when none was, the one attached), if it is this vendor's on this tender. */
  document_id: string | null;
  document_filename: string | null;
  document_size: number | null;
  document_digest: string | null;
  document_figures: BidDocumentFigures | null;
  /** The number of the last amendment issued (0: none), which a submission answers. */
  amendment: number;
  /** The codes sent that are no region of the tender. */
  unknown_codes: string[];
}

/**
 * One statement, after `lockTenderForBid`: locks the vendor's bid row (FOR UPDATE: two tabs of
 * one vendor save one after the other), reads the workbook `documentId` names — or, without one,
 * the workbook already attached — only if it is this vendor's on this tender, the last amendment's
 * number, and which of `codes` are not regions of the tender.
 */
export async function lockOwnBid(
  tx: ClientBase, q: { tenderId: string; vendorId: string; documentId: string | null; codes: readonly string[] },
): Promise<OwnBidRow> {
  const { rows: [row] } = await tx.query<OwnBidRow>({
    name: 'bid-lock-own',
    text: `with b as (select id, status, revision, version, document_id from bid where tender_id = $1 and vendor_organisation_id = $2 for update)
     select b.id, b.status, b.revision, b.version,
            d.id as document_id, d.filename as document_filename, d.size as document_size, d.digest as document_digest, d.figures as document_figures,
            (select coalesce(max(a.number), 0)::int from amendment a where a.tender_id = $1) as amendment,
            array(select c.code from unnest($3::text[]) as c(code)
                   where not exists (select 1 from region r where r.tender_id = $1 and r.code = c.code)) as unknown_codes
       from (select 1) as one
       left join b on true
       left join bid_document d on d.id = coalesce($4::uuid, b.document_id) and d.tender_id = $1 and d.vendor_organisation_id = $2`,
    values: [q.tenderId, q.vendorId, textArray(q.codes), q.documentId],
  });
  // Always one row: the bid, if any, is joined to a row of its own.
  return row;
}

/** Every column of a bid a save sets; `revision` etc. as they are after this save. */
export interface BidWrite {
  tenderId: string;
  vendorId: string;
  /** The version the vendor loaded (null: it had no bid); the save is refused if it is no longer the stored one. */
  loadedVersion: number | null;
  submit: boolean;
  status: BidStatus;
  fixedFee: number;
  capacity: number | null;
  /** Set by a submission; a draft keeps the stored one. */
  submittedAt: Date | null;
  digest: string | null;
  nonce: string | null;
  revision: number;
  /** Set by a submission (clearing the amendment note); a draft keeps the stored one. */
  answersAmendment: number;
  documentId: string | null;
  /** Region codes (all the tender's, checked by `lockOwnBid`) and their unit prices, in the same order. */
  codes: readonly string[];
  prices: readonly number[];
}

/** The bid row as the save left it. */
export interface SavedBidRow {
  id: string;
  status: BidStatus;
  submitted_at: Date | string | null;
  digest: string | null;
  revision: number;
  version: number;
  updated_at: Date | string;
  answers_amendment: number;
  amendment_note: string | null;
}

/**
 * The bid row and all its lines in one statement: the row inserted, or updated over the version the
 * vendor loaded (every save is a new version); its lines upserted from two arrays (code, price) —
 * a line whose price did not change is neither written nor locked again (a vendor saves a draft
 * many times over, changing a few prices; the bid row's lock keeps its lines as read) — and the
 * lines of regions no longer priced deleted; the prices of regions an amendment removed deleted
 * too (they belonged to the receipt of an earlier submission, and this save replaces every figure:
 * the vendor's own act, not a silent loss). The deletes cannot see the rows the upsert writes (one
 * snapshot per statement) and touch only regions not priced now. No row back: the version is not the
 * loaded one, or a first save raced another first save of the same vendor (another tab).
 *
 * As entities this had cost a change set per line (200 for a 200-region bid) and one round trip
 * per table; bench:api, phase b, and the deadline rush measure it.
 */
export async function writeBid(tx: ClientBase, w: BidWrite): Promise<SavedBidRow | undefined> {
  const { rows: [row] } = await tx.query<SavedBidRow>({
    name: 'bid-write',
    text: `with saved as (
       insert into bid as b (id, tender_id, vendor_organisation_id, status, fixed_fee, capacity, submitted_at, digest, nonce, revision, version, answers_amendment, document_id)
       values (gen_random_uuid(), $1, $2, $3::bid_status, $4, $5, $6, $7, $8, $9, 1, $10, $11)
       on conflict (tender_id, vendor_organisation_id) do update set
         status = excluded.status, fixed_fee = excluded.fixed_fee, capacity = excluded.capacity,
         digest = excluded.digest, nonce = excluded.nonce, revision = excluded.revision, document_id = excluded.document_id,
         submitted_at = case when $12::boolean then excluded.submitted_at else b.submitted_at end,
         answers_amendment = case when $12::boolean then excluded.answers_amendment else b.answers_amendment end,
         amendment_note = case when $12::boolean then null else b.amendment_note end,
         version = b.version + 1, updated_at = now()
       where b.version = $13::int
       returning b.id, b.status, b.submitted_at, b.digest, b.revision, b.version, b.updated_at, b.answers_amendment, b.amendment_note),
     priced as (
       select r.id as region_id, l.unit_price
         from unnest($14::text[], $15::numeric[]) as l(code, unit_price) join region r on r.tender_id = $1 and r.code = l.code),
     upserted as (
       insert into bid_line (id, bid_id, region_id, unit_price)
       select gen_random_uuid(), s.id, p.region_id, p.unit_price
         from saved s cross join priced p
         left join bid_line l on l.bid_id = s.id and l.region_id = p.region_id
        where l.unit_price is distinct from p.unit_price
       on conflict (bid_id, region_id) do update set unit_price = excluded.unit_price, updated_at = now()),
     unpriced as (delete from bid_line l using saved s where l.bid_id = s.id and l.region_id not in (select region_id from priced)),
     removed as (delete from bid_removed_line x using saved s where x.bid_id = s.id)
     select * from saved`,
    values: [
      w.tenderId, w.vendorId, w.status, w.fixedFee, w.capacity, w.submittedAt, w.digest, w.nonce, w.revision, w.answersAmendment, w.documentId,
      w.submit, w.loadedVersion,
      textArray(w.codes), numericArray(w.prices),
    ],
  });
  return row;
}

/** A draft save's parameters: no workbook named, no submission. */
export interface DraftWrite {
  tenderId: string;
  vendorId: string;
  /** When the request arrived in full (this server's clock at its edge): on time if before the closing time. */
  arrivedAt: Date;
  loadedVersion: number | null;
  fixedFee: number;
  capacity: number | null;
  codes: readonly string[];
  prices: readonly number[];
}

/** What `bid_save_draft` answers: an outcome, and the row saved or what the refusal's message needs. */
export type DraftSaveRow =
  | ({ outcome: 'saved' } & Omit<SavedBidRow, 'digest'>)
  | { outcome: 'document' }
  | { outcome: 'not-found' | 'changed' | 'submitted' }
  | { outcome: 'closed'; tender_status: TenderStatus; closes_at: Date | string; time_zone: string }
  | { outcome: 'unknown-codes'; unknown_codes: string[] };

/**
 * A draft save in one statement, so one round trip and its own transaction: the PL/pgSQL function
 * `bid_save_draft` (migration `Migration20261210010000`) runs `lockTenderForBid`'s, `lockOwnBid`'s
 * and `writeBid`'s statements in turn, each with a snapshot of its own (taken after the tender's
 * row lock is granted), and refuses before writing anything. `client` is the pool itself (the call
 * commits on its own) or a client inside a transaction (the test hook before the commit).
 */
export async function saveDraftInOneCall(client: Pool | ClientBase, w: DraftWrite): Promise<DraftSaveRow> {
  const { rows: [row] } = await client.query<DraftSaveRow>({
    name: 'bid-save-draft',
    text: `select outcome, tender_status, closes_at, time_zone, unknown_codes, id, status, revision, version, updated_at, submitted_at, answers_amendment, amendment_note
             from bid_save_draft($1, $2, $3, $4, $5, $6, $7::text[], $8::numeric[])`,
    values: [
      w.tenderId, w.vendorId, w.arrivedAt, w.loadedVersion, w.fixedFee, w.capacity,
      textArray(w.codes), numericArray(w.prices),
    ],
  });
  return row;
}

/**
 * Who may save a draft in the statement that reads the session (`saveDraftWithSession`): a person
 * the session names who is active and approved (the session's person columns are null otherwise),
 * a vendor, whose request carries the XSRF token bound to the session (`$9`, as
 * `xsrfSessionBinding` checks it; a session without a bound token binds none).
 */
const DRAFT_GUARD = `s.id is not null and s.role = 'vendor' and s.org_id is not null and (s.xsrf is null or s.xsrf = $9)`;

/**
 * `saveDraftInOneCall` in the statement that reads the session (`writesWithSession` of
 * `PUT /tenders/:id/bid`, auth/session-read.ts): one round trip for the session and the save. The
 * vendor is the session person's organisation. Unless `DRAFT_GUARD` holds, `bid_save_draft` is
 * called with no tender and no vendor, which finds no tender and answers 'not-found' before locking
 * or writing anything; `draft_allowed` says which it was. The request then goes on through the
 * role and XSRF checks as any other: a request they refuse never had its draft written, one they
 * pass had it written exactly as `saveDraftInOneCall` would have.
 */
export function saveDraftWithSession(sid: string, w: Omit<DraftWrite, 'vendorId'>, xsrfHeader: string): ReadWithSession {
  return {
    name: 'bid-save-draft',
    writes: true,
    text: `select (${DRAFT_GUARD}) as draft_allowed,
                  d.outcome, d.tender_status, d.closes_at, d.time_zone, d.unknown_codes, d.id, d.status, d.revision, d.version,
                  d.updated_at, d.submitted_at, d.answers_amendment, d.amendment_note
             from bid_save_draft(case when ${DRAFT_GUARD} then $2::uuid end, case when ${DRAFT_GUARD} then s.org_id end,
                                 $3, $4, $5, $6, $7::text[], $8::numeric[]) d`,
    values: [
      sid, w.tenderId, w.arrivedAt, w.loadedVersion, w.fixedFee, w.capacity, textArray(w.codes), numericArray(w.prices), xsrfHeader,
    ],
  };
}

/** A draft saved with the session (`saveDraftWithSession`): its answer, if the guard let it run. */
export function draftSavedWithSession(row: Record<string, unknown> | undefined): DraftSaveRow | undefined {
  return row && row['draft_allowed'] === true ? (row as unknown as DraftSaveRow) : undefined;
}

/** Numbers as one PostgreSQL array parameter (`?::numeric[]`). */
function numericArray(values: readonly number[]): string {
  return `{${values.map(String).join(',')}}`;
}

/** The bid as its withdrawal left it. */
export interface WithdrawnBidRow {
  id: string;
  revision: number;
  answers_amendment: number;
}

/** Withdraws the bid (locked by `lockOwnBid`): its receipt's commitment and nonce cleared, a new version. */
export async function markBidWithdrawn(tx: ClientBase, bidId: string): Promise<WithdrawnBidRow> {
  const { rows: [row] } = await tx.query<WithdrawnBidRow>({
    name: 'bid-withdraw',
    text: `update bid set status = 'withdrawn', digest = null, nonce = null, version = version + 1, updated_at = now()
            where id = $1 returning id, revision, answers_amendment`,
    values: [bidId],
  });
  return row;
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
