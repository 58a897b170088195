import type { EntityManager } from '@mikro-orm/postgresql';
import type { AwardResult } from '@shared/award';
import { describeAwardBasis } from '@shared/award-basis';
import { EXCLUSION_GROUND_LABELS } from '@shared/compliance';
import type { NoticeKind } from '@shared/notices';
import { Bid, Recommendation, Region, User, type Run, type Tender } from '../../entities';
import { ConflictError } from '../../http/errors';
import { renderMail } from '../../mail/templates';
import { normaliseEmail } from '@shared/auth';
import { LIVE_BID_STATUSES } from '@shared/tenders';
import { formatInZone } from '@shared/time-zone';
import { standstillEnd } from '../standstill';

export interface Letter {
  vendor: { id: string; name: string };
  kind: NoticeKind;
  to: string[];
  subject: string;
  html: string;
  text: string;
  standstillEndsAt: Date;
}

/** Tender statuses in which the approved award's letters exist. */
const LETTER_STATUSES = ['awarded', 'notified', 'contracted'];

/** The approved recommendation: its run is the award the letters announce, its decision date theirs. */
export async function approvedRecommendation(em: EntityManager, tender: Tender): Promise<Recommendation> {
  if (!LETTER_STATUSES.includes(tender.status)) {
    throw new ConflictError('Notices go out once compliance has approved an award for this tender.');
  }
  const rec = await em.findOne(Recommendation, { tender, status: 'approved' }, { populate: ['run'], orderBy: { decidedAt: 'desc' } });
  if (!rec?.decidedAt) throw new ConflictError('This tender has no approved award.');
  return rec;
}

export async function approvedRun(em: EntityManager, tender: Tender): Promise<Run> {
  return (await approvedRecommendation(em, tender)).run;
}

/**
 * The stored standstill end (fixed by the approval). A tender approved before it was stored gets the
 * same computation from the approval's own date, so its letters are still the same each time.
 */
export function storedStandstillEnd(tender: Tender, approvedAt: Date): Date {
  return tender.standstillEndsAt ?? standstillEnd({
    approvedAt, days: tender.standstillDays, timeZone: tender.timeZone, country: tender.buyingBody?.country, closureDays: tender.closureDays,
  }).endsAt;
}

/** Formats of one tender's letters: its locale's numbers and dates, in its time zone. */
export function letterFormats(tender: Tender) {
  const locale = tender.locale;
  const long = new Intl.DateTimeFormat(locale, { dateStyle: 'long', timeZone: tender.timeZone });
  return {
    money: new Intl.NumberFormat(locale, { style: 'currency', currency: tender.currency }),
    price: new Intl.NumberFormat(locale, { style: 'currency', currency: tender.currency, maximumFractionDigits: 4 }),
    qty: new Intl.NumberFormat(locale, { maximumFractionDigits: 3 }),
    date: (d: Date) => long.format(d),
    /** "Wed, 18 Mar 2026, 23:59 GMT (Europe/Dublin)": the one date-time format, in the letter's locale. */
    moment: (d: Date) => formatInZone(d, tender.timeZone, { locale }),
  };
}

/** "This notice is written in English. Figures and dates are written as in English (Ireland)." */
export function languageStatement(locale: string): string {
  const name = new Intl.DisplayNames(['en'], { type: 'language' }).of(locale) ?? locale;
  return `This notice is written in English. Figures and dates are written as in ${name} (${locale}); times are in the procedure's time zone.`;
}

function names(list: string[]): string {
  return list.length <= 1 ? list.join('') : `${list.slice(0, -1).join(', ')} and ${list[list.length - 1]}`;
}

/**
 * Every bidder's letter, rendered from stored inputs only — the approved run, the bids, the
 * compliance decisions, the tender (its buying body, locale, zone and the standstill end fixed at
 * approval) and the approval's date, which is the letters' date. Nothing depends on when it is
 * called: the preview, the send and any later read give the same bytes.
 *
 * Award letters list the vendor's lines and the estimated contract value at the forecast; regret
 * letters name the successful vendors, the award criterion (lowest total cost under the published
 * basis), the bidder's own total and unit prices against the awarded ones in the regions it bid —
 * no rank; exclusion notices give the ground and note.
 */
export async function composeLetters(em: EntityManager, tender: Tender): Promise<Letter[]> {
  const rec = await approvedRecommendation(em, tender);
  const approvedAt = rec.decidedAt!;
  const result = rec.run.result as AwardResult;
  const regionList = await em.find(Region, { tender }, { orderBy: { position: 'asc' } });
  const regions = new Map(regionList.map((r) => [r.code, r]));
  const bids = await em.find(Bid, { tender, status: { $in: [...LIVE_BID_STATUSES] } }, { populate: ['lines.region', 'vendorOrganisation'] });
  const contact = await em.findOneOrFail(User, { id: tender.createdBy.id });
  const f = letterFormats(tender);
  const standstillEndsAt = storedStandstillEnd(tender, approvedAt);
  const body = tender.buyingBody;
  const country = body?.country ? new Intl.DisplayNames(['en'], { type: 'region' }).of(body.country) ?? body.country : '';
  const vendorName = new Map(bids.map((b) => [b.vendorOrganisation.id, b.vendorOrganisation.name]));
  const awardedNames = result.awards.map((a) => vendorName.get(a.vendor) ?? a.vendor).sort((a, b) => a.localeCompare(b));

  const common = {
    reference: tender.reference, title: tender.title, commodity: tender.commodity, unit: tender.unit,
    date: f.date(approvedAt),
    buyingBody: { name: body?.name ?? 'The buying body', address: body?.address ?? '', country, email: body?.email ?? contact.email },
    standstill: tender.standstillDays > 0,
    standstillDays: tender.standstillDays,
    standstillEnds: f.moment(standstillEndsAt),
    exemption: tender.standstillExemption ?? '',
    language: languageStatement(tender.locale),
    contactName: contact.name, contactEmail: contact.email,
  };
  const letters: Letter[] = [];
  for (const bid of [...bids].sort((a, b) => a.vendorOrganisation.name.localeCompare(b.vendorOrganisation.name))) {
    const org = bid.vendorOrganisation;
    // Only people the organisation has approved: one an admin added and its contact has not
    // accepted sees nothing of it, letters included.
    const people = await em.find(User, { vendorOrganisation: org, active: true, membership: 'approved' }, { orderBy: { email: 'asc' } });
    const to = [...new Set([org.contactEmail, ...people.map((p) => p.email)].map(normaliseEmail))];
    const award = result.awards.find((a) => a.vendor === org.id);
    if (bid.complianceDecision === 'excluded') {
      const view = {
        ...common, vendorName: org.name, ground: EXCLUSION_GROUND_LABELS[bid.complianceGround ?? 'other'], note: bid.complianceNote ?? '',
        decidedOn: f.date(bid.complianceDecidedAt ?? approvedAt),
      };
      const mail = renderMail('exclusion-notice', `Exclusion of your bid: ${tender.reference}`, view);
      letters.push({ vendor: { id: org.id, name: org.name }, kind: 'exclusion', to, ...mail, standstillEndsAt });
    } else if (award) {
      const view = {
        ...common, vendorName: org.name,
        lines: award.lines.map((l) => ({ region: l.region, regionName: regions.get(l.region)?.name ?? l.region, quantity: f.qty.format(l.quantity), unitPrice: f.price.format(l.unitPrice), cost: f.money.format(l.cost) })),
        fixedFee: f.money.format(award.fixedFee), contractValue: f.money.format(award.value), totalQuantity: f.qty.format(award.quantity),
      };
      const mail = renderMail('award-letter', `Notice of award: ${tender.reference}`, view);
      letters.push({ vendor: { id: org.id, name: org.name }, kind: 'award', to, ...mail, standstillEndsAt });
    } else {
      // The bidder's own prices against the awarded ones, region by region (the regions it bid).
      const own = bid.lines.getItems().sort((a, b) => a.region.position - b.region.position);
      const total = bid.fixedFee + own.reduce((s, l) => s + l.unitPrice * l.region.forecast, 0);
      const view = {
        ...common, vendorName: org.name,
        successful: names(awardedNames), oneAwarded: awardedNames.length === 1,
        basis: describeAwardBasis(tender.awardBasis, { unit: tender.unit, regions: regionList.map((r) => ({ code: r.code, name: r.name })) }),
        ownTotal: f.money.format(total), ownFee: f.money.format(bid.fixedFee),
        awardedTotal: f.money.format(result.objective ?? 0),
        regions: own.map((l) => ({
          region: l.region.code, regionName: l.region.name, ownPrice: f.price.format(l.unitPrice),
          awarded: result.awards.flatMap((a) => a.lines.filter((x) => x.region === l.region.code).map((x) => `${f.price.format(x.unitPrice)} (${vendorName.get(a.vendor) ?? a.vendor})`)).join('; '),
        })),
      };
      const mail = renderMail('regret-letter', `Outcome of tender ${tender.reference}`, view);
      letters.push({ vendor: { id: org.id, name: org.name }, kind: 'regret', to, ...mail, standstillEndsAt });
    }
  }
  const order = { award: 0, regret: 1, exclusion: 2 };
  return letters.sort((a, b) => (a.kind === b.kind ? a.vendor.name.localeCompare(b.vendor.name) : order[a.kind] - order[b.kind]));
}
