import type { EntityManager } from '@mikro-orm/postgresql';
import type { AwardResult } from '@shared/award';
import { EXCLUSION_GROUND_LABELS } from '@shared/compliance';
import type { NoticeKind } from '@shared/notices';
import { Bid, Recommendation, Region, User, type Run, type Tender } from '../../entities';
import { ConflictError } from '../../http/errors';
import { renderMail } from '../../mail/templates';
import { normaliseEmail } from '@shared/auth';
import { LIVE_BID_STATUSES } from '@shared/tenders';

const DAY = 86_400_000;

export interface Letter {
  vendor: { id: string; name: string };
  kind: NoticeKind;
  to: string[];
  subject: string;
  html: string;
  text: string;
  standstillEndsAt: Date;
}

/** The approved recommendation's run: the award the letters announce. */
export async function approvedRun(em: EntityManager, tender: Tender): Promise<Run> {
  if (tender.status !== 'awarded' && tender.status !== 'notified') {
    throw new ConflictError('Notices go out once compliance has approved an award for this tender.');
  }
  const rec = await em.findOne(Recommendation, { tender, status: 'approved' }, { populate: ['run'], orderBy: { decidedAt: 'desc' } });
  if (!rec) throw new ConflictError('This tender has no approved award.');
  return rec.run;
}

function ordinal(n: number): string {
  const s = ['th', 'st', 'nd', 'rd'];
  const v = n % 100;
  return `${n}${s[(v - 20) % 10] ?? s[v] ?? s[0]}`;
}

/**
 * Every bidder's letter, rendered from view models: the awarded vendors' award letters (their
 * lines, which add up to the contract value), the excluded bidders' exclusion notices (ground, note,
 * date, remedies) and the others' regret letters (their own rank among the bids evaluated and the
 * awarded total — never another vendor's prices).
 */
export async function composeLetters(em: EntityManager, tender: Tender, sentAt = new Date()): Promise<Letter[]> {
  const run = await approvedRun(em, tender);
  const result = run.result as AwardResult;
  const regions = new Map((await em.find(Region, { tender })).map((r) => [r.code, r]));
  const bids = await em.find(Bid, { tender, status: { $in: [...LIVE_BID_STATUSES] } }, { populate: ['lines.region', 'vendorOrganisation'] });
  const contact = await em.findOneOrFail(User, { id: tender.createdBy.id });
  const money = new Intl.NumberFormat(tender.locale, { style: 'currency', currency: tender.currency });
  const qty = new Intl.NumberFormat(tender.locale, { maximumFractionDigits: 3 });
  const price = new Intl.NumberFormat(tender.locale, { style: 'currency', currency: tender.currency, maximumFractionDigits: 4 });
  const longDate = new Intl.DateTimeFormat(tender.locale, { dateStyle: 'long', timeZone: 'UTC' });
  const standstillEndsAt = new Date(sentAt.getTime() + tender.standstillDays * DAY);

  // Rank: cost per unit of each bid at the forecast of the regions it covered, fee included; among
  // the bids evaluated (an excluded bid was not: its vendor gets an exclusion notice, unranked).
  const evaluated = bids.filter((b) => b.complianceDecision !== 'excluded');
  const perUnit = evaluated.map((b) => {
    const lines = b.lines.getItems();
    const volume = lines.reduce((s, l) => s + l.region.forecast, 0);
    const cost = b.fixedFee + lines.reduce((s, l) => s + l.unitPrice * l.region.forecast, 0);
    return { id: b.vendorOrganisation.id, value: volume > 0 ? cost / volume : Infinity };
  }).sort((a, b) => a.value - b.value);

  const common = {
    reference: tender.reference, title: tender.title, commodity: tender.commodity, unit: tender.unit,
    date: longDate.format(sentAt), standstillEnds: longDate.format(standstillEndsAt),
    contactName: contact.name, contactEmail: contact.email,
  };
  const letters: Letter[] = [];
  for (const bid of bids) {
    const org = bid.vendorOrganisation;
    // Only people the organisation has approved: one an admin added and its contact has not
    // accepted sees nothing of it, letters included.
    const people = await em.find(User, { vendorOrganisation: org, active: true, membership: 'approved' });
    const to = [...new Set([org.contactEmail, ...people.map((p) => p.email)].map(normaliseEmail))];
    const award = result.awards.find((a) => a.vendor === org.id);
    if (bid.complianceDecision === 'excluded') {
      const view = {
        ...common, vendorName: org.name, ground: EXCLUSION_GROUND_LABELS[bid.complianceGround ?? 'other'], note: bid.complianceNote ?? '',
        decidedOn: longDate.format(bid.complianceDecidedAt ?? sentAt),
      };
      const mail = renderMail('exclusion-notice', `Exclusion of your bid: ${tender.reference}`, view);
      letters.push({ vendor: { id: org.id, name: org.name }, kind: 'exclusion', to, ...mail, standstillEndsAt });
    } else if (award) {
      const view = {
        ...common, vendorName: org.name,
        lines: award.lines.map((l) => ({ region: l.region, regionName: regions.get(l.region)?.name ?? l.region, quantity: qty.format(l.quantity), unitPrice: price.format(l.unitPrice), cost: money.format(l.cost) })),
        fixedFee: money.format(award.fixedFee), contractValue: money.format(award.value), totalQuantity: qty.format(award.quantity),
      };
      const mail = renderMail('award-letter', `Notice of award: ${tender.reference}`, view);
      letters.push({ vendor: { id: org.id, name: org.name }, kind: 'award', to, ...mail, standstillEndsAt });
    } else {
      const view = {
        ...common, vendorName: org.name,
        rank: ordinal(perUnit.findIndex((p) => p.id === org.id) + 1), bidders: evaluated.length,
        awardedTotal: money.format(result.objective ?? 0), awardedVendors: result.awards.length, oneAwarded: result.awards.length === 1,
      };
      const mail = renderMail('regret-letter', `Outcome of tender ${tender.reference}`, view);
      letters.push({ vendor: { id: org.id, name: org.name }, kind: 'regret', to, ...mail, standstillEndsAt });
    }
  }
  const order = { award: 0, regret: 1, exclusion: 2 };
  return letters.sort((a, b) => (a.kind === b.kind ? a.vendor.name.localeCompare(b.vendor.name) : order[a.kind] - order[b.kind]));
}
