import { createHash } from 'node:crypto';
import { LockMode, type EntityManager } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import { recordByCode, type BidFigures } from '@shared/bids';
import { bidsValidUntil } from '@shared/compliance';
import { describeAwardBasis } from '@shared/award-basis';
import { formatInZone } from '@shared/time-zone';
import type { BidSave, BidView, BidsAnswer, TabulatedBid } from '@shared/tenders';
import { wrap } from '@mikro-orm/core';
import { Bid, BidDocument, BidRemovedLine, Tender, type User } from '../entities';
import { AppError, ConflictError, NotFoundError, ValidationError } from '../http/errors';
import { enqueueMail } from '../jobs/queue';
import { renderMail } from '../mail/templates';
import { buildBidWorkbook } from '../workbooks/bid-workbook';
import { parseBidWorkbookOffThread } from '../workbooks/workbook-pool';
import { assertBidMatchesDocument, keepDocumentIfMatching } from './bid-documents';
import { buildTabulationWorkbook } from '../workbooks/tabulation-workbook';
import { regionInputs } from './tenders.service';
import { audit } from './audit.service';
import { bidCommitment, commitBid } from './bid-commitment';
import { closeIfDue, findVisibleTender } from './tender-access';
import { isLiveBid, isSealed, LIVE_BID_STATUSES } from '@shared/tenders';
import { biddingTenderForShare, replaceBidLines, tabulationRows } from './queries/bids.queries';
import { openingTender } from './queries/opening.queries';
import { tenderRegionRows } from './queries/tender-rows.queries';
import { abnormallyLowFlags } from './evaluation/abnormally-low';
import { exportName } from '../http/download';

export interface BidDeps {
  em: EntityManager;
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



/** `nonce` only once the tender is closed: before, it would let a reader test guesses of the figures. */
function bidView(bid: Bid, prices: Record<string, number> = linePrices(bid), document = bid.document ?? null, revealNonce = false): BidView {
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
    document: document ? { id: document.id, filename: document.filename, size: document.size, digest: document.digest } : null,
    answersAmendment: bid.answersAmendment,
    amendmentNote: bid.amendmentNote ?? null,
  };
}

function linePrices(bid: Bid): Record<string, number> {
  return recordByCode(bid.lines.getItems().map((line) => [line.region.code, line.unitPrice] as const));
}

function vendorOf(user: User) {
  if (!user.vendorOrganisation) throw new AppError(403, 'Not allowed', 'Only vendors bid.');
  return user.vendorOrganisation;
}

export async function ownBid(em: EntityManager, user: User, tenderId: string): Promise<BidView | null> {
  const tender = await findVisibleTender(em, user, tenderId);
  const bid = await em.findOne(Bid, { tender, vendorOrganisation: vendorOf(user) }, { populate: ['lines.region', 'document'] });
  if (!bid) return null;
  const view = bidView(bid, undefined, undefined, !isSealed(tender.status));
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
 * Runs a bid's transaction; when it is refused because bidding has closed, closes the tender too
 * (with its audit entry) if it is due and nothing else has yet, as every read does.
 */
async function whileOpen<T>(deps: BidDeps, tenderId: string, work: (tx: EntityManager) => Promise<T>): Promise<T> {
  const em = deps.em;
  await deps.hooks?.beforeBidTransaction?.({ tenderId, arrivedAt: deps.arrivedAt });
  try {
    return await em.transactional(work);
  } catch (error) {
    if (error instanceof BiddingClosed) await closeIfDue(em, tenderId);
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
  /** Region code → region id. */
  regions: Map<string, string>;
  /** The number of the last amendment issued (0: none), which a submission answers. */
  amendment: number;
}

/**
 * One query: locks the tender row for sharing (bids of many vendors proceed together; closing
 * waits for them), checks that `vendorId` was invited (otherwise "not found", as on every read),
 * that the request arrived before the closing time (`arrivedAt`, this server's clock at its edge)
 * and that the tender is still open — not yet closed and opened, which happens CLOSING_GRACE_MS
 * after the closing time (tender-access.ts); and reads the region codes. Saving a bid was the
 * slowest vendor request (bench:api, phase b) while this took five round trips and hydrated every
 * region as an entity.
 */
async function lockOpenTender(tx: EntityManager, tenderId: string, vendorId: string, arrivedAt: Date): Promise<BiddingTender> {
  const row = await biddingTenderForShare(tx, tenderId, vendorId);
  if (!row || !row.invited || row.status === 'draft' || !row.published) throw new NotFoundError('The tender');
  const closesAt = new Date(row.closes_at);
  if (row.status !== 'open' || arrivedAt.getTime() >= closesAt.getTime()) throw new BiddingClosed(closesAt, row.time_zone, row.status === 'cancelled');
  return { id: tenderId, reference: row.reference, title: row.title, closesAt, timeZone: row.time_zone, regions: new Map(Object.entries(row.regions ?? {})), amendment: row.amendment };
}

/** Save a draft, submit, or revise — only before closing, and only over the version loaded. */
export async function saveBid(deps: BidDeps, user: User, tenderId: string, input: BidSave): Promise<BidView> {
  const org = vendorOf(user);
  const { bid: saved, tender: bidding } = await whileOpen(deps, tenderId, async (tx) => {
    const bidding = await lockOpenTender(tx, tenderId, org.id, deps.arrivedAt);
    const codes = Object.keys(input.prices);
    const unknown = codes.filter((code) => !bidding.regions.has(code));
    if (unknown.length) {
      throw new ValidationError(unknown.map((code) => ({ field: `prices.${code}`, message: `Region ${code} is not part of this tender.` })));
    }
    const tender = tx.getReference(Tender, tenderId);
    const existing: Bid | null = await tx.findOne(Bid, { tender, vendorOrganisation: org }, { lockMode: LockMode.PESSIMISTIC_WRITE });
    const loaded = input.version ?? null;
    if ((existing?.version ?? null) !== loaded) {
      throw new ConflictError('This bid was changed elsewhere (another tab or a colleague) since you loaded it. Reload it to see the current figures; nothing was saved.');
    }
    if (existing && !input.submit && isLiveBid(existing.status)) {
      throw new ConflictError('This bid is submitted. Submit your changes as a revision, or withdraw the bid.');
    }
    const bid = existing ?? tx.create(Bid, { tender, vendorOrganisation: org, fixedFee: input.fixedFee, capacity: input.capacity });
    bid.fixedFee = input.fixedFee;
    bid.capacity = input.capacity;
    // Every save is a new version, even one that changes only prices (the lines are another table).
    bid.updatedAt = new Date();
    if (input.documentId) {
      const doc = await tx.findOne(BidDocument, { id: input.documentId, tender, vendorOrganisation: org });
      if (!doc) throw new ValidationError([{ field: 'documentId', message: 'This uploaded workbook is not yours or does not exist.' }]);
      assertBidMatchesDocument(doc, input);
      bid.document = doc;
    } else await keepDocumentIfMatching(tx, bid, input);
    if (input.submit) {
      bid.status = bid.revision > 0 ? 'revised' : 'submitted';
      bid.revision += 1;
      bid.submittedAt = deps.arrivedAt;
      // A fresh nonce for every submission: the receipt of each revision is its own commitment.
      const { nonce, digest } = commitBid({ tender: bidding.reference, vendor: org.id, revision: bid.revision, ...input });
      bid.nonce = nonce;
      bid.digest = digest;
      bid.answersAmendment = bidding.amendment;
      bid.amendmentNote = null;
    } else {
      bid.status = 'draft';
      bid.digest = null;
      bid.nonce = null;
    }
    // The bid row first (a new bid's lines refer to it), then its lines replaced in one statement:
    // as entities, 200 lines cost 200 change sets. The delete cannot see the rows the upsert
    // writes (one snapshot per statement), so it removes only regions no longer priced.
    // Prices of regions an amendment removed belonged to the receipt of an earlier submission; this
    // save replaces every figure of the bid, so they go too (the vendor's own act, not a silent
    // loss), in the same statement: one round trip less while the bid holds its locks.
    await tx.flush();
    await replaceBidLines(tx, bid.id, codes.map((c) => ({ region_id: bidding.regions.get(c)!, unit_price: input.prices[c] })));
    await deps.hooks?.beforeBidCommit?.({ tenderId, arrivedAt: deps.arrivedAt });
    return { bid, tender: bidding };
  });
  if (input.submit) {
    await auditBid(deps, tenderId, saved.revision > 1 ? 'bid.revised' : 'bid.submitted', saved);
    await sendReceipt(deps, user, bidding, saved, 'submitted');
  }
  // The prices stored are the ones sent: at most 4 decimals, exact in numeric(16,4).
  const doc = saved.document && !wrap(saved.document).isInitialized() ? await deps.em.fork().findOneOrFail(BidDocument, saved.document.id) : saved.document;
  return bidView(saved, input.prices, doc ?? null);
}

export async function withdrawBid(deps: BidDeps, user: User, tenderId: string, version: number): Promise<BidView> {
  const org = vendorOf(user);
  const { bid, tender } = await whileOpen(deps, tenderId, async (tx) => {
    const bidding = await lockOpenTender(tx, tenderId, org.id, deps.arrivedAt);
    const b = await tx.findOne(Bid, { tender: tenderId, vendorOrganisation: org }, { lockMode: LockMode.PESSIMISTIC_WRITE });
    if (!b) throw new NotFoundError('Your bid');
    if (b.version !== version) throw new ConflictError('This bid was changed elsewhere since you loaded it. Reload it; nothing was withdrawn.');
    if (b.status === 'withdrawn') throw new ConflictError('This bid is already withdrawn.');
    b.status = 'withdrawn';
    b.digest = null;
    b.nonce = null;
    await tx.flush();
    await deps.hooks?.beforeBidCommit?.({ tenderId, arrivedAt: deps.arrivedAt });
    return { bid: b, tender: bidding };
  });
  await auditBid(deps, tenderId, 'bid.withdrawn', bid);
  await sendReceipt(deps, user, tender, bid, 'withdrawn');
  const fresh = await deps.em.fork().findOneOrFail(Bid, { id: bid.id }, { populate: ['lines.region', 'document'] });
  return bidView(fresh);
}

/**
 * The trail records that a bid arrived, was revised or was withdrawn — its revision and when it
 * was received — never its figures, its vendor or anything computed from the figures (not even
 * the receipt's commitment: the trail is readable before closing). Written just after the bid's
 * own transaction rather than inside it: the chain's per-tender lock would otherwise make every
 * vendor's save wait for the others'. So a bid received just before the closing time may be
 * recorded after the tender's closing entry; `receivedAt` says when it came.
 */
async function auditBid(deps: BidDeps, tenderId: string, action: string, bid: Bid): Promise<void> {
  const detail = { revision: bid.revision, receivedAt: deps.arrivedAt.toISOString() };
  await deps.em.fork().transactional((tx) => audit(tx, { tenderId, actor: null, action, subject: `bid ${bid.id}`, detail }));
}

/** The receipt never carries figures: the admin can read the outbox before closing. */
async function sendReceipt(deps: BidDeps, user: User, tender: BiddingTender, bid: Bid, what: 'submitted' | 'withdrawn'): Promise<void> {
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
  await enqueueMail(deps.boss, { to: user.email, ...mail });
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
  const bid = await em.findOne(Bid, { tender, vendorOrganisation: vendorOf(user) }, { populate: ['lines.region'] });
  const own = bid ? bidView(bid) : null;
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
    tender, vendorOrganisation: org, uploadedBy: user,
    filename: file.originalname.slice(0, 255) || 'bid.xlsx',
    size: file.size,
    digest: createHash('sha256').update(file.buffer).digest('hex'),
    content: file.buffer,
    figures: { ...parsed.bid, priceCells: parsed.priceCells },
  });
  await em.flush();
  return { documentId: doc.id, bid: parsed.bid };
}

