import { createHash } from 'node:crypto';
import { LockMode, type EntityManager } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import type { BidFigures } from '@shared/bids';
import type { BidSave, BidStatus, BidView, BidsAnswer, TabulatedBid } from '@shared/tenders';
import { Bid, BidDocument, BidLine, Region, Tender, type User } from '../entities';
import { AppError, ConflictError, NotFoundError, ValidationError } from '../http/errors';
import { enqueueMail } from '../jobs/queue';
import { renderMail } from '../mail/templates';
import { buildBidWorkbook, parseBidWorkbook } from '../workbooks/bid-workbook';
import { buildTabulationWorkbook } from '../workbooks/tabulation-workbook';
import { regionInputs } from './tenders.service';
import { audit } from './audit.service';
import { findVisibleTender } from './tender-access';

export interface BidDeps {
  em: EntityManager;
  boss: PgBoss;
  publicUrl: string;
}

const LIVE: BidStatus[] = ['submitted', 'revised'];
const utc = (d: Date) => d.toISOString().slice(0, 19).replace('T', ' ') + ' UTC';

/**
 * SHA-256 of a bid's canonical content: tender reference, vendor organisation, revision, fee, cap
 * and the prices sorted by region code, as JSON with no spaces. The receipt carries it, so a vendor
 * can prove later what it submitted.
 */
export function bidDigest(reference: string, vendorId: string, revision: number, figures: BidFigures): string {
  const prices = Object.keys(figures.prices).sort().map((code) => [code, figures.prices[code]]);
  const canonical = JSON.stringify({ tender: reference, vendor: vendorId, revision, fixedFee: figures.fixedFee, capacity: figures.capacity, prices });
  return createHash('sha256').update(canonical).digest('hex');
}

function bidView(bid: Bid): BidView {
  const prices: Record<string, number> = {};
  for (const line of bid.lines.getItems()) prices[line.region.code] = line.unitPrice;
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
    updatedAt: bid.updatedAt.toISOString(),
    document: bid.document ? { id: bid.document.id, filename: bid.document.filename, size: bid.document.size, digest: bid.document.digest } : null,
  };
}

function vendorOf(user: User) {
  if (!user.vendorOrganisation) throw new AppError(403, 'Not allowed', 'Only vendors bid.');
  return user.vendorOrganisation;
}

export async function ownBid(em: EntityManager, user: User, tenderId: string): Promise<BidView | null> {
  const tender = await findVisibleTender(em, user, tenderId);
  const bid = await em.findOne(Bid, { tender, vendorOrganisation: vendorOf(user) }, { populate: ['lines.region', 'document'] });
  return bid ? bidView(bid) : null;
}

/**
 * Locks the tender row for sharing (bids of many vendors proceed together; closing waits for them)
 * and checks, by the database server's clock inside this transaction, that bidding is open.
 */
async function lockOpenTender(tx: EntityManager, tenderId: string): Promise<Tender> {
  const rows = await tx.execute<{ status: string; closes_at: Date; now: Date }[]>(
    `select status, closes_at, clock_timestamp() as now from tender where id = ? for share`, [tenderId],
  );
  const row = rows[0];
  if (!row) throw new NotFoundError('The tender');
  if (row.status !== 'open' || new Date(row.now) >= new Date(row.closes_at)) {
    throw new ConflictError(`Bidding closed at ${utc(new Date(row.closes_at))}. Bids can no longer be saved, revised or withdrawn.`);
  }
  return tx.getReference(Tender, tenderId);
}

/** Save a draft, submit, or revise — only before closing, and only over the version loaded. */
export async function saveBid(deps: BidDeps, user: User, tenderId: string, input: BidSave): Promise<BidView> {
  const org = vendorOf(user);
  const visible = await findVisibleTender(deps.em, user, tenderId);
  const regions = new Map(visible.regions.getItems().map((r) => [r.code, r]));
  const unknown = Object.keys(input.prices).filter((code) => !regions.has(code));
  if (unknown.length) {
    throw new ValidationError(unknown.map((code) => ({ field: `prices.${code}`, message: `Region ${code} is not part of this tender.` })));
  }
  const saved = await deps.em.transactional(async (tx) => {
    const tender = await lockOpenTender(tx, tenderId);
    const existing: Bid | null = await tx.findOne(Bid, { tender, vendorOrganisation: org }, { lockMode: LockMode.PESSIMISTIC_WRITE });
    const loaded = input.version ?? null;
    if ((existing?.version ?? null) !== loaded) {
      throw new ConflictError('This bid was changed elsewhere (another tab or a colleague) since you loaded it. Reload it to see the current figures; nothing was saved.');
    }
    if (existing && !input.submit && LIVE.includes(existing.status)) {
      throw new ConflictError('This bid is submitted. Submit your changes as a revision, or withdraw the bid.');
    }
    const bid = existing ?? tx.create(Bid, { tender, vendorOrganisation: org, fixedFee: input.fixedFee, capacity: input.capacity });
    bid.fixedFee = input.fixedFee;
    bid.capacity = input.capacity;
    // The lines are replaced whole: old ones deleted first (the unique bid+region index).
    if (existing) await tx.nativeDelete(BidLine, { bid: existing });
    for (const [code, price] of Object.entries(input.prices)) {
      tx.create(BidLine, { bid, region: tx.getReference(Region, regions.get(code)!.id), unitPrice: price });
    }
    if (input.documentId) {
      const doc = await tx.findOne(BidDocument, { id: input.documentId, tender, vendorOrganisation: org });
      if (!doc) throw new ValidationError([{ field: 'documentId', message: 'This uploaded workbook is not yours or does not exist.' }]);
      bid.document = doc;
    }
    if (input.submit) {
      bid.status = bid.revision > 0 ? 'revised' : 'submitted';
      bid.revision += 1;
      bid.submittedAt = new Date();
      bid.digest = bidDigest(visible.reference, org.id, bid.revision, input);
    } else {
      bid.status = 'draft';
      bid.digest = null;
    }
    return bid;
  });
  if (input.submit) {
    await auditBid(deps.em, tenderId, saved.revision > 1 ? 'bid.revised' : 'bid.submitted', saved, { revision: saved.revision, digest: saved.digest });
    await sendReceipt(deps, user, visible, saved, 'submitted');
  }
  const fresh = await deps.em.fork().findOneOrFail(Bid, { id: saved.id }, { populate: ['lines.region', 'document'] });
  return bidView(fresh);
}

export async function withdrawBid(deps: BidDeps, user: User, tenderId: string, version: number): Promise<BidView> {
  const org = vendorOf(user);
  const visible = await findVisibleTender(deps.em, user, tenderId);
  const bid = await deps.em.transactional(async (tx) => {
    const tender = await lockOpenTender(tx, tenderId);
    const b = await tx.findOne(Bid, { tender, vendorOrganisation: org }, { lockMode: LockMode.PESSIMISTIC_WRITE });
    if (!b) throw new NotFoundError('Your bid');
    if (b.version !== version) throw new ConflictError('This bid was changed elsewhere since you loaded it. Reload it; nothing was withdrawn.');
    if (b.status === 'withdrawn') throw new ConflictError('This bid is already withdrawn.');
    b.status = 'withdrawn';
    b.digest = null;
    return b;
  });
  await auditBid(deps.em, tenderId, 'bid.withdrawn', bid, { revision: bid.revision });
  await sendReceipt(deps, user, visible, bid, 'withdrawn');
  const fresh = await deps.em.fork().findOneOrFail(Bid, { id: bid.id }, { populate: ['lines.region', 'document'] });
  return bidView(fresh);
}

/**
 * The trail records that a bid changed state and its digest, never its figures or its vendor.
 * Written just after the bid's own transaction rather than inside it: the chain's per-tender lock
 * would otherwise make every vendor's save wait for the others' — near the deadline, long enough
 * to be refused. The digest is on the bid and in the receipt either way.
 */
async function auditBid(em: EntityManager, tenderId: string, action: string, bid: Bid, detail: Record<string, unknown>): Promise<void> {
  await em.fork().transactional((tx) => audit(tx, { tenderId, actor: null, action, subject: `bid ${bid.id}`, detail }));
}

/** The receipt never carries figures: the admin can read the outbox before closing. */
async function sendReceipt(deps: BidDeps, user: User, tender: Tender, bid: Bid, what: 'submitted' | 'withdrawn'): Promise<void> {
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
    at: utc(new Date()),
    digest: bid.digest ?? '',
    closesAt: utc(tender.closesAt),
    link: `${deps.publicUrl}/tenders/${tender.id}`,
  });
  await enqueueMail(deps.boss, { to: user.email, ...mail });
}

/** Sealed until closing: before it, only the count of submitted bids. */
export async function bidsOf(em: EntityManager, user: User, tenderId: string): Promise<BidsAnswer> {
  const tender = await findVisibleTender(em, user, tenderId);
  const submitted = await em.count(Bid, { tender, status: { $in: LIVE } });
  if (tender.status === 'draft' || tender.status === 'open') return { submitted };
  return { submitted, bids: await tabulate(em, tender) };
}

/**
 * One query, prices gathered per bid by PostgreSQL: hydrating 30 bids × 200 lines × their regions
 * as entities took over a second per request (bench:api, phase c).
 */
async function tabulate(em: EntityManager, tender: Tender): Promise<TabulatedBid[]> {
  const rows = await em.execute<{
    vendor_id: string; vendor_name: string; sme: boolean; fixed_fee: string; capacity: string | null;
    submitted_at: Date | string; digest: string; document_id: string | null; prices: Record<string, number | string> | null;
  }[]>(
    `select o.id as vendor_id, o.name as vendor_name, o.sme, b.fixed_fee, b.capacity, b.submitted_at, b.digest, b.document_id,
            (select json_object_agg(r.code, l.unit_price order by r.position)
               from bid_line l join region r on r.id = l.region_id where l.bid_id = b.id) as prices
       from bid b join vendor_organisation o on o.id = b.vendor_organisation_id
      where b.tender_id = ? and b.status in ('submitted', 'revised')
      order by o.name asc, o.id asc`,
    [tender.id],
  );
  return rows.map((b) => ({
    vendor: { id: b.vendor_id, name: b.vendor_name, sme: b.sme },
    fixedFee: Number(b.fixed_fee),
    capacity: b.capacity === null ? null : Number(b.capacity),
    prices: Object.fromEntries(Object.entries(b.prices ?? {}).map(([code, price]) => [code, Number(price)])),
    submittedAt: new Date(b.submitted_at).toISOString(),
    digest: b.digest,
    documentId: b.document_id,
  }));
}

function assertUnsealed(tender: Tender): void {
  if (tender.status === 'draft' || tender.status === 'open') {
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
  return { filename: `${tender.reference.replace(/[^A-Za-z0-9._-]/g, '_')}-bid-tabulation.xlsx`, content };
}

export async function bidDocument(em: EntityManager, user: User, tenderId: string, documentId: string): Promise<BidDocument> {
  const tender = await findVisibleTender(em, user, tenderId);
  assertUnsealed(tender);
  // Only the workbook behind a live bid is part of the record.
  const bid = await em.findOne(Bid, { tender, document: documentId, status: { $in: LIVE } });
  if (!bid) throw new NotFoundError('The workbook');
  return em.findOneOrFail(BidDocument, { id: documentId }, { populate: ['content'] });
}

export async function vendorWorkbook(em: EntityManager, user: User, tenderId: string): Promise<{ filename: string; content: Buffer }> {
  const tender = await findVisibleTender(em, user, tenderId);
  const bid = await em.findOne(Bid, { tender, vendorOrganisation: vendorOf(user) }, { populate: ['lines.region'] });
  const own = bid ? bidView(bid) : null;
  const content = await buildBidWorkbook({
    reference: tender.reference, title: tender.title, currency: tender.currency, unit: tender.unit,
    closesAt: tender.closesAt.toISOString(), vendorName: vendorOf(user).name, regions: regionInputs(tender),
    bid: own ? { fixedFee: own.fixedFee, capacity: own.capacity, prices: own.prices } : undefined,
  });
  return { filename: `${tender.reference.replace(/[^A-Za-z0-9._-]/g, '_')}-bid.xlsx`, content };
}

/** Reads an uploaded workbook into bid figures for review; keeps the file for the bid record. */
export async function uploadWorkbook(
  em: EntityManager, user: User, tenderId: string, file: { buffer: Buffer; originalname: string; size: number },
): Promise<{ documentId: string; bid: BidFigures }> {
  const org = vendorOf(user);
  const tender = await findVisibleTender(em, user, tenderId);
  if (tender.status !== 'open') throw new ConflictError(`Bidding closed at ${utc(tender.closesAt)}.`);
  const parsed = await parseBidWorkbook(file.buffer, regionInputs(tender), { reference: tender.reference });
  if (!parsed.ok) {
    throw new ValidationError(parsed.errors.map((e) => ({ field: e.cell || 'file', message: e.message })), 'The workbook has problems; nothing was saved.');
  }
  const doc = em.create(BidDocument, {
    tender, vendorOrganisation: org, uploadedBy: user,
    filename: file.originalname.slice(0, 255) || 'bid.xlsx',
    size: file.size,
    digest: createHash('sha256').update(file.buffer).digest('hex'),
    content: file.buffer,
  });
  await em.flush();
  return { documentId: doc.id, bid: parsed.bid };
}

