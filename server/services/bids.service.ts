import { createHash } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import type { Pool, PoolClient } from 'pg';
import type PgBoss from 'pg-boss';
import { recordByCode, type BidFigures } from '@shared/bids';
import { bidsValidUntil } from '@shared/compliance';
import { describeAwardBasis } from '@shared/award-basis';
import { formatInZone } from '@shared/time-zone';
import type { BidSave, BidView, BidsAnswer, TabulatedBid } from '@shared/tenders';
import { Bid, BidDocument, BidRemovedLine, type Tender, type User } from '../entities';
import type { Principal } from '../auth/session-user';
import type { ReadWithSession } from '../auth/session.queries';
import { AppError, ConflictError, NotFoundError, ValidationError } from '../http/errors';
import { enqueueMail } from '../jobs/queue';
import { renderMail } from '../mail/templates';
import { buildBidWorkbook } from '../workbooks/bid-workbook';
import { parseBidWorkbookOffThread } from '../workbooks/workbook-pool';
import { assertBidMatchesDocument, keepsDocument } from './bid-documents';
import { lockOwnBid, lockTenderForBid, markBidWithdrawn, draftSavedWithSession, saveDraftInOneCall, saveDraftWithSession, writeBid, type DraftSaveRow, type DraftWrite } from './queries/bids.queries';
import { buildTabulationWorkbook } from '../workbooks/tabulation-workbook';
import { regionInputs } from './tenders.service';
import { auditOnPool } from './audit.service';
import { bossDbOf, inPoolTransaction } from './queries/transaction.queries';
import { bidCommitment, commitBid } from './bid-commitment';
import { closeIfDue, findVisibleTender } from './tender-access';
import { isLiveBid, isSealed, LIVE_BID_STATUSES } from '@shared/tenders';
import { tabulationRows } from './queries/bids.queries';
import { openingTender } from './queries/opening.queries';
import { tenderRegionRows } from './queries/tender-rows.queries';
import { abnormallyLowFlags } from './evaluation/abnormally-low';
import { exportName } from '../http/download';

export interface BidDeps {
  /** The request's EntityManager (a getter in the route: the save itself never forks one). */
  em: EntityManager;
  /** The plain pg pool (`AppDeps.sessionPool`): the bid save's transaction and the bids' audit entries. */
  pool: Pool;
  boss: PgBoss;
  publicUrl: string;
  /** When the request arrived in full, by this server's clock (http/arrival.ts): the receipt time. */
  arrivedAt: Date;
  hooks?: BidHooks;
}

/**
 * Test hooks: hold a bid between its arrival and its transaction, or inside the transaction (its
 * tender row locked, the bid written) until the test lets it commit.
 */
export interface BidHooks {
  beforeBidTransaction?: (at: { tenderId: string; arrivedAt: Date }) => Promise<void>;
  beforeBidCommit?: (at: { tenderId: string; arrivedAt: Date }) => Promise<void>;
}



/** What a bid's view shows of it: a Bid entity, or the row its save returned. */
interface BidFields {
  id: string;
  status: Bid['status'];
  fixedFee: number;
  capacity?: number | null;
  revision: number;
  version: number;
  submittedAt?: Date | null;
  digest?: string | null;
  nonce?: string | null;
  updatedAt: Date;
  answersAmendment: number;
  amendmentNote?: string | null;
}

/** `nonce` only once the tender is closed: before, it would let a reader test guesses of the figures. */
function bidView(bid: BidFields, prices: Record<string, number>, document: BidView['document'], revealNonce = false): BidView {
  return {
    id: bid.id,
    status: bid.status,
    fixedFee: bid.fixedFee,
    capacity: bid.capacity ?? null,
    prices,
    revision: bid.revision,
    version: bid.version,
    submittedAt: bid.submittedAt?.toISOString() ?? null,
    digest: bid.digest ?? null,
    ...(revealNonce ? { nonce: bid.nonce ?? null } : {}),
    updatedAt: bid.updatedAt.toISOString(),
    document,
    answersAmendment: bid.answersAmendment,
    amendmentNote: bid.amendmentNote ?? null,
  };
}

const documentView = (d: BidDocument | null | undefined): BidView['document'] =>
  (d ? { id: d.id, filename: d.filename, size: d.size, digest: d.digest } : null);

function linePrices(bid: Bid): Record<string, number> {
  return recordByCode(bid.lines.getItems().map((line) => [line.region.code, line.unitPrice] as const));
}

function vendorOf(user: Principal) {
  if (!user.vendorOrganisation) throw new AppError(403, 'Not allowed', 'Only vendors bid.');
  return user.vendorOrganisation;
}

export async function ownBid(em: EntityManager, user: User, tenderId: string): Promise<BidView | null> {
  const tender = await findVisibleTender(em, user, tenderId);
  const bid = await em.findOne(Bid, { tender, vendorOrganisation: vendorOf(user).id }, { populate: ['lines.region', 'document'] });
  if (!bid) return null;
  const view = bidView(bid, linePrices(bid), documentView(bid.document), !isSealed(tender.status));
  // Its own prices for regions an amendment removed: part of its receipt, shown apart.
  const removed = await em.find(BidRemovedLine, { bid }, { orderBy: { regionCode: 'asc' } });
  if (removed.length) view.removedPrices = recordByCode(removed.map((r) => [r.regionCode, r.unitPrice] as const));
  if (isSealed(tender.status) || !isLiveBid(bid.status)) return view;
  const validUntil = bidsValidUntil(tender.closesAt, tender.bidValidityDays);
  return { ...view, validity: { validUntil: validUntil.toISOString(), extendedUntil: bid.validityExtendedUntil?.toISOString() ?? null } };
}

class BiddingClosed extends ConflictError {
  constructor(closesAt: Date, timeZone: string, cancelled = false) {
    super(cancelled
      ? 'The buyer cancelled this tender. Bids can no longer be saved, revised or withdrawn; they stay sealed.'
      : `Bidding closed at ${formatInZone(closesAt, timeZone)}. Bids can no longer be saved, revised or withdrawn.`);
  }
}

/**
 * Runs a bid's transaction (`run`); when it is refused because bidding has closed, closes the tender
 * too (with its audit entry) if it is due and nothing else has yet, as every read does.
 */
async function whileOpen<T>(deps: BidDeps, tenderId: string, run: () => Promise<T>): Promise<T> {
  await deps.hooks?.beforeBidTransaction?.({ tenderId, arrivedAt: deps.arrivedAt });
  try {
    return await run();
  } catch (error) {
    if (error instanceof BiddingClosed) await closeIfDue(deps.em, tenderId);
    throw error;
  }
}

/** What a bid's save, withdrawal and receipt need of its tender, read under the lock. */
interface BiddingTender {
  id: string;
  reference: string;
  title: string;
  closesAt: Date;
  /** The procedure's IANA time zone, in which closing times are shown. */
  timeZone: string;
}

/**
 * The first statement of a bid's transaction (`lockTenderForBid`): locks the tender row for sharing
 * (bids of many vendors proceed together; closing waits for them), checks that `vendorId` was
 * invited (otherwise "not found", as on every read), that the request arrived before the closing
 * time (`arrivedAt`, this server's clock at its edge) and that the tender is still open — not yet
 * closed and opened, which happens CLOSING_GRACE_MS after the closing time (tender-access.ts).
 */
async function lockOpenTender(tx: PoolClient, tenderId: string, vendorId: string, arrivedAt: Date): Promise<BiddingTender> {
  const row = await lockTenderForBid(tx, tenderId, vendorId);
  if (!row || !row.invited || row.status === 'draft' || !row.published) throw new NotFoundError('The tender');
  const closesAt = new Date(row.closes_at);
  if (row.status !== 'open' || arrivedAt.getTime() >= closesAt.getTime()) throw new BiddingClosed(closesAt, row.time_zone, row.status === 'cancelled');
  return { id: tenderId, reference: row.reference, title: row.title, closesAt, timeZone: row.time_zone };
}

const CHANGED_ELSEWHERE = 'This bid was changed elsewhere (another tab or a colleague) since you loaded it. Reload it to see the current figures; nothing was saved.';
const DRAFT_OVER_SUBMITTED = 'This bid is submitted. Submit your changes as a revision, or withdraw the bid.';

/** 400 naming each price whose code is no region of the tender. */
const notRegions = (codes: readonly string[]) =>
  new ValidationError(codes.map((code) => ({ field: `prices.${code}`, message: `Region ${code} is not part of this tender.` })));

/**
 * A draft save without a workbook named: one call of `bid_save_draft` (`saveDraftInOneCall`), one
 * round trip, its own transaction — the same locks, checks and writes as the transaction of
 * `saveBid` below, in the same order, each statement seeing what was committed before the tender's
 * lock was granted. Refusals become the same errors. Null when the bid has a workbook attached:
 * whether the draft keeps it (`keepsDocument`) is decided by the multi-statement save.
 * With the test hook `beforeBidCommit`, the call runs in a transaction held open before its commit.
 */
async function saveDraft(deps: BidDeps, vendorId: string, tenderId: string, input: BidSave, savedWithSession?: DraftSaveRow): Promise<BidView | null> {
  const draft: DraftWrite = { ...draftWrite(tenderId, input, deps.arrivedAt), vendorId };
  const row = await whileOpen(deps, tenderId, async () => {
    const hook = deps.hooks?.beforeBidCommit;
    const answer = savedWithSession ?? (hook
      ? await inPoolTransaction(deps.pool, async (tx) => {
        const held = await saveDraftInOneCall(tx, draft);
        if (held.outcome === 'saved') await hook({ tenderId, arrivedAt: deps.arrivedAt });
        return held;
      })
      : await saveDraftInOneCall(deps.pool, draft));
    switch (answer.outcome) {
      case 'saved': case 'document': return answer;
      case 'not-found': throw new NotFoundError('The tender');
      case 'closed': throw new BiddingClosed(new Date(answer.closes_at), answer.time_zone, answer.tender_status === 'cancelled');
      case 'unknown-codes': throw notRegions(answer.unknown_codes);
      case 'changed': throw new ConflictError(CHANGED_ELSEWHERE);
      case 'submitted': throw new ConflictError(DRAFT_OVER_SUBMITTED);
    }
  });
  if (row.outcome === 'document') return null;
  const fields: BidFields = {
    id: row.id, status: row.status, fixedFee: input.fixedFee, capacity: input.capacity, revision: row.revision, version: row.version,
    submittedAt: row.submitted_at === null ? null : new Date(row.submitted_at), digest: null,
    updatedAt: new Date(row.updated_at), answersAmendment: row.answers_amendment, amendmentNote: row.amendment_note,
  };
  return bidView(fields, input.prices, null);
}

function draftWrite(tenderId: string, input: BidSave, arrivedAt: Date): Omit<DraftWrite, 'vendorId'> {
  const codes = Object.keys(input.prices);
  return {
    tenderId, arrivedAt, loadedVersion: input.version ?? null,
    fixedFee: input.fixedFee, capacity: input.capacity, codes, prices: codes.map((code) => input.prices[code]),
  };
}

/**
 * A draft's save made in the statement that reads the session (`writesWithSession` of the save's
 * route; `saveDraftWithSession`): none for a submission, a draft that names a workbook, or a request
 * without the XSRF header (refused before the session is read). `saveBid` then takes its answer
 * (`savedWithSession`) in place of `saveDraftInOneCall`'s.
 */
export function draftWithSession(sid: string, tenderId: string, input: BidSave, arrivedAt: Date, xsrfHeader: string | undefined): ReadWithSession | undefined {
  if (input.submit || input.documentId || !xsrfHeader) return undefined;
  return saveDraftWithSession(sid, draftWrite(tenderId, input, arrivedAt), xsrfHeader);
}

/**
 * Save a draft, submit, or revise — only before closing, and only over the version loaded. One
 * transaction on a client of the plain pg pool, no ORM (SQL in queries/bids.queries.ts, named
 * statements): the tender row locked and the closing time checked; the vendor's bid locked and read
 * with its workbook, the last amendment and the codes that are no region; the bid row and every line
 * written in one statement; a submission's receipt queued in the same transaction (stored and
 * receipted, or neither). Its audit entry follows the commit (see `auditBid`), before the answer.
 */
export async function saveBid(deps: BidDeps, user: Principal, tenderId: string, input: BidSave, readWithSession?: Record<string, unknown>): Promise<BidView> {
  const org = vendorOf(user);
  if (!input.submit && !input.documentId) {
    // Saved already if the route's statement that read the session saved it (`draftWithSession`).
    const draft = await saveDraft(deps, org.id, tenderId, input, draftSavedWithSession(readWithSession));
    // None: a workbook is attached, and whether this draft keeps it is decided below.
    if (draft) return draft;
  }
  const { fields, document } = await whileOpen(deps, tenderId, () => inPoolTransaction(deps.pool, async (tx) => {
    const bidding = await lockOpenTender(tx, tenderId, org.id, deps.arrivedAt);
    const codes = Object.keys(input.prices);
    const own = await lockOwnBid(tx, { tenderId, vendorId: org.id, documentId: input.documentId ?? null, codes });
    if (own.unknown_codes.length) throw notRegions(own.unknown_codes);
    if (own.version !== (input.version ?? null)) throw new ConflictError(CHANGED_ELSEWHERE);
    if (own.status && !input.submit && isLiveBid(own.status)) throw new ConflictError(DRAFT_OVER_SUBMITTED);
    let attached = own.document_id === null ? null : own;
    if (input.documentId) {
      if (!attached) throw new ValidationError([{ field: 'documentId', message: 'This uploaded workbook is not yours or does not exist.' }]);
      assertBidMatchesDocument({ figures: attached.document_figures }, input);
    } else if (attached && !keepsDocument(attached.document_figures, input)) attached = null;
    const revision = (own.revision ?? 0) + (input.submit ? 1 : 0);
    // A fresh nonce for every submission: the receipt of each revision is its own commitment.
    const commitment = input.submit ? commitBid({ tender: bidding.reference, vendor: org.id, revision, ...input }) : null;
    const saved = await writeBid(tx, {
      tenderId, vendorId: org.id, loadedVersion: input.version ?? null, submit: input.submit,
      status: input.submit ? (revision > 1 ? 'revised' : 'submitted') : 'draft',
      fixedFee: input.fixedFee, capacity: input.capacity,
      submittedAt: input.submit ? deps.arrivedAt : null,
      digest: commitment?.digest ?? null, nonce: commitment?.nonce ?? null,
      revision, answersAmendment: own.amendment, documentId: attached?.document_id ?? null,
      codes, prices: codes.map((code) => input.prices[code]),
    });
    if (!saved) throw new ConflictError(CHANGED_ELSEWHERE);
    const fields: BidFields = {
      id: saved.id, status: saved.status, fixedFee: input.fixedFee, capacity: input.capacity, revision: saved.revision, version: saved.version,
      submittedAt: saved.submitted_at === null ? null : new Date(saved.submitted_at), digest: saved.digest,
      updatedAt: new Date(saved.updated_at), answersAmendment: saved.answers_amendment, amendmentNote: saved.amendment_note,
    };
    if (input.submit) await queueReceipt(deps, tx, user, bidding, fields, 'submitted');
    await deps.hooks?.beforeBidCommit?.({ tenderId, arrivedAt: deps.arrivedAt });
    const document = attached && {
      id: attached.document_id!, filename: attached.document_filename!, size: attached.document_size!, digest: attached.document_digest!,
    };
    return { fields, document };
  }));
  if (input.submit) await auditBid(deps, tenderId, fields.revision > 1 ? 'bid.revised' : 'bid.submitted', fields);
  // The prices stored are the ones sent: at most 4 decimals, exact in numeric(16,4).
  return bidView(fields, input.prices, document);
}

export async function withdrawBid(deps: BidDeps, user: Principal, tenderId: string, version: number): Promise<BidView> {
  const org = vendorOf(user);
  const withdrawn = await whileOpen(deps, tenderId, () => inPoolTransaction(deps.pool, async (tx) => {
    const bidding = await lockOpenTender(tx, tenderId, org.id, deps.arrivedAt);
    const own = await lockOwnBid(tx, { tenderId, vendorId: org.id, documentId: null, codes: [] });
    if (!own.id) throw new NotFoundError('Your bid');
    if (own.version !== version) throw new ConflictError('This bid was changed elsewhere since you loaded it. Reload it; nothing was withdrawn.');
    if (own.status === 'withdrawn') throw new ConflictError('This bid is already withdrawn.');
    const row = await markBidWithdrawn(tx, own.id);
    const bid = { id: row.id, revision: row.revision, digest: null, answersAmendment: row.answers_amendment };
    await queueReceipt(deps, tx, user, bidding, bid, 'withdrawn');
    await deps.hooks?.beforeBidCommit?.({ tenderId, arrivedAt: deps.arrivedAt });
    return bid;
  }));
  await auditBid(deps, tenderId, 'bid.withdrawn', withdrawn);
  const fresh = await deps.em.fork().findOneOrFail(Bid, { id: withdrawn.id }, { populate: ['lines.region', 'document'] });
  return bidView(fresh, linePrices(fresh), documentView(fresh.document));
}

/**
 * The trail records that a bid arrived, was revised or was withdrawn — its revision and when it
 * was received — never its figures, its vendor or anything computed from the figures (not even
 * the receipt's commitment: the trail is readable before closing). Written just after the bid's
 * own transaction rather than inside it: the chain's per-tender lock would otherwise make every
 * vendor's save wait for the others' while holding its locks and connection (tried: in the
 * deadline rush, 500 vendors on one tender, every save then took about 10 s). So a bid received
 * just before the closing time may be recorded after the tender's closing entry; `receivedAt`
 * says when it came.
 */
async function auditBid(deps: BidDeps, tenderId: string, action: string, bid: Pick<BidFields, 'id' | 'revision'>): Promise<void> {
  const detail = { revision: bid.revision, receivedAt: deps.arrivedAt.toISOString() };
  await auditOnPool(deps.pool, { tenderId, actorId: null, action, subject: `bid ${bid.id}`, detail });
}

/**
 * Queues the receipt in the bid's own transaction (pg-boss `send` on its client): it is sent if and
 * only if the bid (or its withdrawal) is stored. It never carries figures: the admin can read the
 * outbox before closing.
 */
async function queueReceipt(
  deps: BidDeps, tx: PoolClient, user: Principal, tender: BiddingTender, bid: Pick<BidFields, 'revision' | 'digest' | 'answersAmendment'>, what: 'submitted' | 'withdrawn',
): Promise<void> {
  const subject = what === 'submitted'
    ? `Receipt: your bid on ${tender.reference} (revision ${bid.revision})`
    : `Receipt: your bid on ${tender.reference} is withdrawn`;
  const mail = renderMail('bid-receipt', subject, {
    name: user.name,
    organisation: user.vendorOrganisation?.name ?? '',
    reference: tender.reference,
    title: tender.title,
    withdrawn: what === 'withdrawn',
    revision: bid.revision,
    at: deps.arrivedAt,
    digest: bid.digest ?? '',
    answersAmendment: bid.answersAmendment,
    closesAt: tender.closesAt,
    timeZone: tender.timeZone,
    link: `${deps.publicUrl}/tenders/${tender.id}`,
  });
  await enqueueMail(deps.boss, { to: user.email, ...mail }, undefined, bossDbOf(tx));
}

/** Sealed until closing: before it, only the count of submitted bids. */
export async function bidsOf(em: EntityManager, user: User, tenderId: string): Promise<BidsAnswer> {
  const tender = await findVisibleTender(em, user, tenderId);
  const submitted = await em.count(Bid, { tender, status: { $in: [...LIVE_BID_STATUSES] } });
  if (isSealed(tender.status)) return { submitted };
  return { submitted, bids: await tabulate(em, tender) };
}

/**
 * Every live (submitted or revised) bid of the tender, by vendor name: the tabulation, and the
 * award problem of a run. One query, prices gathered per bid by PostgreSQL: hydrating 30 bids ×
 * 200 lines × their regions as entities took over a second per request (bench:api, phase c).
 * Only for a closed tender: each bid comes with its receipt's commitment, the nonce that keys it,
 * and whether the stored figures still give that commitment (`receiptVerified`).
 */
export async function tabulate(em: EntityManager, tender: Pick<Tender, 'id'>): Promise<TabulatedBid[]> {
  const rows = await tabulationRows(em, tender.id);
  // The abnormally-low percent is read with the tender's fields the opening record uses.
  const [regions, settings] = await Promise.all([tenderRegionRows(em, tender.id), openingTender(em, tender.id)]);
  const iso = (d: Date | string | null) => (d === null ? null : new Date(d).toISOString());
  const bids = rows.map((b) => {
    const fixedFee = Number(b.fixed_fee);
    const capacity = b.capacity === null ? null : Number(b.capacity);
    const prices = recordByCode(Object.entries(b.prices ?? {}).map(([code, price]) => [code, Number(price)] as const));
    // The receipt commits to the prices as submitted, those of regions an amendment removed since included.
    const removedPrices = b.removed ? recordByCode(Object.entries(b.removed).map(([code, price]) => [code, Number(price)] as const)) : null;
    const committed = removedPrices ? recordByCode([...Object.entries(prices), ...Object.entries(removedPrices)]) : prices;
    const recomputed = b.nonce ? bidCommitment(b.nonce, { tender: b.reference, vendor: b.vendor_id, revision: b.revision, fixedFee, capacity, prices: committed }) : null;
    return {
      id: b.id,
      vendor: { id: b.vendor_id, name: b.vendor_name, sme: b.sme },
      fixedFee,
      capacity,
      prices,
      submittedAt: new Date(b.submitted_at).toISOString(),
      revision: b.revision,
      digest: b.digest,
      nonce: b.nonce,
      ...(removedPrices ? { removedPrices } : {}),
      receiptVerified: recomputed !== null && recomputed === b.digest,
      documentId: b.document_id,
      compliance: { decision: b.compliance_decision, ground: b.compliance_ground, note: b.compliance_note, decidedAt: iso(b.compliance_decided_at) },
      abnormallyLow: b.low_price_decided_at === null ? null : {
        explanationRequestedAt: iso(b.low_price_explanation_requested_at), accepted: b.low_price_accepted === true,
        note: b.low_price_note ?? '', decidedAt: iso(b.low_price_decided_at)!,
      },
    };
  });
  const flags = abnormallyLowFlags(
    bids.map((b) => ({ vendor: b.vendor.id, excluded: b.compliance.decision === 'excluded', fixedFee: b.fixedFee, prices: b.prices })),
    regions.map((r) => ({ code: r.code, forecast: Number(r.forecast) })),
    Number(settings?.abnormally_low_percent ?? 20),
  );
  return bids.map((b) => ({ ...b, flags: flags.get(b.vendor.id)! }));
}

function assertUnsealed(tender: Tender): void {
  if (isSealed(tender.status)) {
    throw new ConflictError('Bids are sealed until the closing time.');
  }
}

export async function tabulationWorkbook(em: EntityManager, user: User, tenderId: string): Promise<{ filename: string; content: Buffer }> {
  const tender = await findVisibleTender(em, user, tenderId);
  assertUnsealed(tender);
  const content = await buildTabulationWorkbook({
    reference: tender.reference, title: tender.title, currency: tender.currency, unit: tender.unit,
    regions: regionInputs(tender), bids: await tabulate(em, tender),
  });
  return { filename: exportName(tender.reference, 'bid-tabulation.xlsx'), content };
}

export async function bidDocument(em: EntityManager, user: User, tenderId: string, documentId: string): Promise<BidDocument> {
  const tender = await findVisibleTender(em, user, tenderId);
  assertUnsealed(tender);
  // Only the workbook behind a live bid is part of the record.
  const bid = await em.findOne(Bid, { tender, document: documentId, status: { $in: [...LIVE_BID_STATUSES] } });
  if (!bid) throw new NotFoundError('The workbook');
  return em.findOneOrFail(BidDocument, { id: documentId }, { populate: ['content'] });
}

export async function vendorWorkbook(em: EntityManager, user: User, tenderId: string): Promise<{ filename: string; content: Buffer }> {
  const tender = await findVisibleTender(em, user, tenderId);
  const bid = await em.findOne(Bid, { tender, vendorOrganisation: vendorOf(user).id }, { populate: ['lines.region'] });
  const own = bid ? { fixedFee: bid.fixedFee, capacity: bid.capacity ?? null, prices: linePrices(bid) } : null;
  const content = await buildBidWorkbook({
    reference: tender.reference, title: tender.title, currency: tender.currency, unit: tender.unit,
    closesAt: tender.closesAt.toISOString(), timeZone: tender.timeZone, vendorName: vendorOf(user).name, regions: regionInputs(tender),
    awardBasis: describeAwardBasis(tender.awardBasis, { unit: tender.unit, regions: regionInputs(tender) }),
    bid: own ? { fixedFee: own.fixedFee, capacity: own.capacity, prices: own.prices } : undefined,
  });
  return { filename: exportName(tender.reference, 'bid.xlsx'), content };
}

/** Reads an uploaded workbook into bid figures for review; keeps the file for the bid record. */
export async function uploadWorkbook(
  em: EntityManager, user: User, tenderId: string, file: { buffer: Buffer; originalname: string; size: number }, arrivedAt: Date,
): Promise<{ documentId: string; bid: BidFigures }> {
  const org = vendorOf(user);
  const tender = await findVisibleTender(em, user, tenderId);
  // As a bid: on time when the upload arrived in full before the closing time.
  if (tender.status !== 'open' || arrivedAt.getTime() >= tender.closesAt.getTime()) throw new ConflictError(`Bidding closed at ${formatInZone(tender.closesAt, tender.timeZone)}.`);
  const parsed = await parseBidWorkbookOffThread(file.buffer, regionInputs(tender), { reference: tender.reference });
  if (!parsed.ok) {
    throw new ValidationError(parsed.errors.map((e) => ({ field: e.cell || 'file', message: e.message })), 'The workbook has problems; nothing was saved.');
  }
  const doc = em.create(BidDocument, {
    tender, vendorOrganisation: org.id, uploadedBy: user,
    filename: file.originalname.slice(0, 255) || 'bid.xlsx',
    size: file.size,
    digest: createHash('sha256').update(file.buffer).digest('hex'),
    content: file.buffer,
    figures: { ...parsed.bid, priceCells: parsed.priceCells },
  });
  await em.flush();
  return { documentId: doc.id, bid: parsed.bid };
}

