import type { EntityManager } from '@mikro-orm/postgresql';
import type { AwardResult } from '@shared/award';
import { formatInZone } from '@shared/time-zone';
import { bidsValidUntil, type AbnormallyLowInput, type ComplianceInput } from '@shared/compliance';
import { LIVE_BID_STATUSES, type TabulatedBid } from '@shared/tenders';
import { Bid, Recommendation, Tender, type Run, type User } from '../entities';
import { AppError, ConflictError, NotFoundError, ValidationError } from '../http/errors';
import { audit } from './audit.service';
import { tabulate } from './bids.service';
import { isFlagged } from './evaluation/abnormally-low';
import { solvedVendors } from './queries/evaluation.queries';
import { tenderForShare } from './queries/tender-rows.queries';
import { findVisibleTender, lockTender } from './tender-access';
import { transition } from './transition';

const DAY = 86_400_000;
const LIVE = [...LIVE_BID_STATUSES];
const NOT_CHECKABLE = 'Bids are checked after closing and before an award is approved: this tender is not closed, or its award is already approved.';
const NOT_LIVE = 'This bid is no longer a submitted bid.';
const AWAITING = 'A recommendation is awaiting compliance: it must be approved or returned before a bid\'s check changes.';


/** The live bid `bidId` of the tender, read inside the decision's transaction (404 otherwise). */
async function liveBid(tx: EntityManager, tenderId: string, bidId: string): Promise<TabulatedBid> {
  const bid = (await tabulate(tx, { id: tenderId })).find((b) => b.id === bidId);
  if (!bid) throw new NotFoundError('The bid');
  return bid;
}

async function noRecommendationAwaiting(tx: EntityManager, tenderId: string): Promise<void> {
  if (await tx.count(Recommendation, { tender: tenderId, status: 'recommended' })) throw new ConflictError(AWAITING);
}

/**
 * The buyer's compliance check of one bid: compliant, or excluded on a ground from the fixed list
 * with a note. Under the tender's lock (closed, not yet awarded), with its audit entry. An
 * excluded bid is out of every scenario's problem from then on (evaluation/problem.ts).
 */
export async function decideCompliance(em: EntityManager, user: User, tenderId: string, bidId: string, input: ComplianceInput): Promise<TabulatedBid> {
  await em.transactional(async (tx) => {
    await lockTender(tx, user, tenderId, ['closed'], NOT_CHECKABLE);
    await noRecommendationAwaiting(tx, tenderId);
    const bid = await liveBid(tx, tenderId, bidId);
    const ground = input.decision === 'excluded' ? input.ground! : null;
    const decidedAt = new Date();
    await transition(tx, Bid, bidId, LIVE, { complianceDecision: input.decision, complianceGround: ground, complianceNote: input.note, complianceDecidedAt: decidedAt }, NOT_LIVE);
    await audit(tx, {
      tenderId, actor: user, action: input.decision === 'excluded' ? 'bid.excluded' : 'bid.compliant', subject: `bid ${bidId}`,
      detail: { vendor: bid.vendor.name, decision: input.decision, ground, note: input.note, decidedAt: decidedAt.toISOString() },
      before: bid.compliance, after: { decision: input.decision, ground, note: input.note },
    });
  });
  return (await tabulate(em.fork(), { id: tenderId })).find((b) => b.id === bidId)!;
}

/**
 * The buyer's decision on a flagged bid: an explanation was asked for (when), and whether it was
 * accepted, with the reasons. Only for a bid with a flag, not excluded; under the tender's lock,
 * with the flags as they stand in the audit entry.
 */
export async function decideAbnormallyLow(em: EntityManager, user: User, tenderId: string, bidId: string, input: AbnormallyLowInput): Promise<TabulatedBid> {
  await em.transactional(async (tx) => {
    await lockTender(tx, user, tenderId, ['closed'], NOT_CHECKABLE);
    await noRecommendationAwaiting(tx, tenderId);
    const bid = await liveBid(tx, tenderId, bidId);
    if (bid.compliance.decision === 'excluded') throw new ConflictError('This bid is excluded: it is out of every scenario, and its flags need no decision.');
    if (!isFlagged(bid.flags)) throw new ConflictError('Nothing in this bid is flagged as abnormally low.');
    const tender = await tx.findOneOrFail(Tender, { id: tenderId });
    const decidedAt = new Date();
    const askedAt = input.explanationRequestedAt ? new Date(input.explanationRequestedAt) : decidedAt;
    if (askedAt.getTime() < tender.closesAt.getTime() || askedAt.getTime() > decidedAt.getTime()) {
      throw new ValidationError([{ field: 'explanationRequestedAt', message: `The explanation is asked for after the closing time (${formatInZone(tender.closesAt, tender.timeZone)}) and not in the future.` }]);
    }
    await transition(tx, Bid, bidId, LIVE, { lowPriceExplanationRequestedAt: askedAt, lowPriceAccepted: input.accepted, lowPriceNote: input.note, lowPriceDecidedAt: decidedAt }, NOT_LIVE);
    await audit(tx, {
      tenderId, actor: user, action: input.accepted ? 'bid.abnormally-low-accepted' : 'bid.abnormally-low-not-accepted', subject: `bid ${bidId}`,
      detail: {
        vendor: bid.vendor.name, explanationRequestedAt: askedAt.toISOString(), accepted: input.accepted, note: input.note,
        flags: { percent: bid.flags.percent, regions: bid.flags.prices.map((p) => ({ region: p.region, price: p.price, median: p.median })), total: bid.flags.total },
      },
      before: bid.abnormallyLow, after: { explanationRequestedAt: askedAt.toISOString(), accepted: input.accepted, note: input.note },
    });
  });
  return (await tabulate(em.fork(), { id: tenderId })).find((b) => b.id === bidId)!;
}

/**
 * Before a run is recommended: it must not award an excluded bid (a run solved before the
 * exclusion), and every flagged line it awards — a flagged vendor's quantity in a flagged region,
 * or anything at all for a flagged total — needs the buyer's accepted explanation. 409 naming the
 * vendor and the region otherwise.
 */
export async function assertRecommendable(em: EntityManager, tenderId: string, run: Run): Promise<void> {
  const bids = new Map((await tabulate(em, { id: tenderId })).map((b) => [b.vendor.id, b]));
  const solvedFor = await solvedVendors(em, run.id);
  const solvedWithExcluded = solvedFor.filter((v) => bids.get(v.id)?.compliance.decision === 'excluded');
  if (solvedWithExcluded.length) {
    throw new ConflictError(`This run was solved before the bid of ${solvedWithExcluded.map((v) => v.name).join(', ')} was excluded: run the scenario again and recommend the new run.`);
  }
  const problems: string[] = [];
  for (const award of (run.result as AwardResult | null)?.awards ?? []) {
    const bid = bids.get(award.vendor);
    if (!bid || !isFlagged(bid.flags) || bid.abnormallyLow?.accepted) continue;
    const regions = bid.flags.prices.filter((p) => award.lines.some((l) => l.region === p.region && l.quantity > 0)).map((p) => p.region);
    const what = [
      ...regions.map((r) => `its unit price in region ${r}`),
      ...(bid.flags.total ? ['its total at the forecast'] : []),
    ];
    if (!what.length) continue;
    const state = bid.abnormallyLow ? 'its explanation was not accepted: exclude the bid on the ground abnormally-low' : 'record that an explanation was asked for and whether it was accepted, or exclude the bid';
    problems.push(`${bid.vendor.name}: ${what.join(' and ')} ${what.length > 1 ? 'are' : 'is'} flagged as abnormally low; ${state}.`);
  }
  if (problems.length) throw new ConflictError(`This run awards abnormally low prices not yet cleared. ${problems.join(' ')}`);
}

const validUntil = (tender: Pick<Tender, 'closesAt' | 'bidValidityDays'>) => bidsValidUntil(tender.closesAt, tender.bidValidityDays);

/**
 * Inside the approval's transaction: after the bids' validity has ended, every vendor the run awards
 * must have confirmed an extension that still runs. 409 naming those that have not.
 */
export async function assertBidsValid(tx: EntityManager, tenderId: string, run: Run, now = new Date()): Promise<void> {
  const tender = await tx.findOneOrFail(Tender, { id: tenderId });
  const ends = validUntil(tender);
  if (now.getTime() <= ends.getTime()) return;
  const awarded = ((run.result as AwardResult | null)?.awards ?? []).map((a) => a.vendor);
  const bids = await tx.find(Bid, { tender: tenderId, vendorOrganisation: { $in: awarded }, status: { $in: LIVE } }, { populate: ['vendorOrganisation'] });
  const missing = awarded.filter((v) => {
    const bid = bids.find((b) => b.vendorOrganisation.id === v);
    return !bid?.validityExtendedUntil || bid.validityExtendedUntil.getTime() < now.getTime();
  }).map((v) => bids.find((b) => b.vendorOrganisation.id === v)?.vendorOrganisation.name ?? v);
  if (missing.length) {
    throw new ConflictError(`The bids' validity ended on ${formatInZone(ends, tender.timeZone)}; each awarded vendor must confirm an extension before the award can be approved. Not yet confirmed: ${missing.join(', ')}.`);
  }
}

/**
 * A vendor confirms in the portal that its bid stays valid until `until` (absent: one more
 * validity period after the current end, or after now when that has passed). After closing and before the award is approved; audited.
 */
export async function extendValidity(em: EntityManager, user: User, tenderId: string, input: { until?: string }): Promise<{ validUntil: string; extendedUntil: string }> {
  if (!user.vendorOrganisation) throw new AppError(403, 'Not allowed', 'Only vendors confirm their bids.');
  const org = user.vendorOrganisation;
  await findVisibleTender(em, user, tenderId);
  return em.transactional(async (tx) => {
    // FOR SHARE: an approval (FOR NO KEY UPDATE) waits for this, or this sees the tender awarded.
    const row = await tenderForShare(tx, tenderId);
    if (row?.status !== 'closed') throw new ConflictError('A bid\'s validity is extended after closing and before the award is approved.');
    const tender = await tx.findOneOrFail(Tender, { id: tenderId });
    const bid = await tx.findOne(Bid, { tender: tenderId, vendorOrganisation: org.id, status: { $in: LIVE } });
    if (!bid) throw new NotFoundError('Your bid');
    const ends = validUntil(tender);
    const current = bid.validityExtendedUntil && bid.validityExtendedUntil > ends ? bid.validityExtendedUntil : ends;
    // Absent: one more validity period, from the current end or from now if that has passed.
    const until = input.until ? new Date(input.until) : new Date(Math.max(current.getTime(), Date.now()) + tender.bidValidityDays * DAY);
    if (until.getTime() <= current.getTime() || until.getTime() <= Date.now()) {
      throw new ValidationError([{ field: 'until', message: `The extension must run past ${formatInZone(current, tender.timeZone)} and past today.` }]);
    }
    await transition(tx, Bid, bid.id, LIVE, { validityExtendedUntil: until }, NOT_LIVE);
    await audit(tx, {
      tenderId, actor: user, action: 'bid.validity-extended', subject: `bid ${bid.id}`,
      detail: { vendor: org.name, validUntil: ends.toISOString(), extendedUntil: until.toISOString() },
      before: { extendedUntil: bid.validityExtendedUntil?.toISOString() ?? null }, after: { extendedUntil: until.toISOString() },
    });
    return { validUntil: ends.toISOString(), extendedUntil: until.toISOString() };
  });
}
