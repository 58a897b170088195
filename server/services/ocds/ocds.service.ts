import type { EntityManager } from '@mikro-orm/postgresql';
import { describeAwardBasis } from '@shared/award-basis';
import { isSealed, LIVE_BID_STATUSES } from '@shared/tenders';
import { Amendment, AuditEntry, Bid, Contract, Notice, Question, Recommendation, RunAward, type Tender, type User } from '../../entities';
import { setting } from '../../config';
import { ConflictError } from '../../http/errors';
import { findVisibleTender } from '../tender-access';
import { buildReleasePackage, type ContractInput, type OcdsInput, type OcdsParty } from './release-package';

/** The contracts recorded after the standstill (the contract step), as the release package takes them. */
export async function loadContracts(em: EntityManager, tender: Tender): Promise<ContractInput[]> {
  const contracts = await em.find(Contract, { tender }, { populate: ['lines', 'lines.region'], orderBy: { signedOn: 'asc', createdAt: 'asc' } });
  return contracts.map((c) => ({
    vendorId: c.vendorOrganisation.id,
    signedOn: c.signedOn,
    lines: c.lines.getItems().map((l) => ({ regionCode: l.region.code, quantity: l.quantity, unitPrice: l.unitPrice })),
  }));
}

/**
 * The tender's OCDS 1.1.5 release package, for the buyer owning it and compliance. A draft has
 * nothing published yet (409). While the bids are sealed nothing about them is read at all.
 */
export async function ocdsPackage(em: EntityManager, user: User, tenderId: string, publicUrl: string): Promise<{ reference: string; content: Record<string, unknown> }> {
  const tender = await findVisibleTender(em, user, tenderId);
  if (tender.status === 'draft') throw new ConflictError('The tender is a draft: nothing is published yet, so there is no open data to give.');
  const sealed = isSealed(tender.status);
  const regions = tender.regions.getItems().map((r) => ({ code: r.code, name: r.name, forecast: r.forecast }));

  const amendments = await em.find(Amendment, { tender }, { orderBy: { number: 'asc' } });
  const answered = await em.find(Question, { tender, status: 'answered' }, { fields: ['answeredAt'] });

  let tenderers: OcdsParty[] | null = null;
  let award: OcdsInput['award'] = null;
  let notified: OcdsInput['notified'] = null;
  let contracts: ContractInput[] = [];
  if (!sealed) {
    const bids = await em.find(Bid, { tender, status: { $in: [...LIVE_BID_STATUSES] } }, { populate: ['vendorOrganisation'], fields: ['vendorOrganisation'] });
    tenderers = bids.map((b) => ({ vendorId: b.vendorOrganisation.id, name: b.vendorOrganisation.name, registrationNumber: b.vendorOrganisation.registrationNumber }))
      .sort((a, b) => a.name.localeCompare(b.name));
    const approved = await em.findOne(Recommendation, { tender, status: 'approved' }, { populate: ['run'] });
    if (approved?.decidedAt) {
      const rows = await em.find(RunAward, { run: approved.run }, { populate: ['vendorOrganisation'], orderBy: { regionCode: 'asc' } });
      const fees = new Map((approved.run.result?.awards ?? []).map((a) => [a.vendor, a.fixedFee]));
      const vendors = new Map<string, NonNullable<OcdsInput['award']>['vendors'][number]>();
      for (const row of rows) {
        const org = row.vendorOrganisation;
        const v = vendors.get(org.id) ?? { vendorId: org.id, name: org.name, registrationNumber: org.registrationNumber, fixedFee: fees.get(org.id) ?? 0, lines: [] };
        v.lines.push({ regionCode: row.regionCode, quantity: row.quantity, unitPrice: row.unitPrice });
        vendors.set(org.id, v);
      }
      award = { approvedAt: approved.decidedAt, vendors: [...vendors.values()].sort((a, b) => a.name.localeCompare(b.name)) };
      const done = await em.findOne(AuditEntry, { tender, action: 'tender.notified' }, { orderBy: { seq: 'desc' } });
      if (done) {
        // Fixed once at approval on the tender; tenders approved before that carry it on their notices.
        const notices = tender.standstillEndsAt ? [] : await em.find(Notice, { tender }, { fields: ['standstillEndsAt'] });
        const ends = notices.map((n) => n.standstillEndsAt.getTime());
        notified = { at: done.at, standstillEndsAt: tender.standstillEndsAt ?? (ends.length ? new Date(Math.max(...ends)) : null) };
      }
      contracts = await loadContracts(em, tender);
    }
  }

  const content = buildReleasePackage({
    tender: {
      id: tender.id, reference: tender.reference, title: tender.title, description: tender.description, commodity: tender.commodity,
      unit: tender.unit, currency: tender.currency, timeZone: tender.timeZone, buyingBody: tender.buyingBody ?? null,
      awardBasis: describeAwardBasis(tender.awardBasis, { unit: tender.unit, regions }),
      publishedAt: tender.publishedAt ?? null, closesAt: tender.closesAt, clarificationsCloseAt: tender.clarificationsCloseAt ?? null,
      closedAt: tender.closedAt ?? null, cancelledAt: tender.cancelledAt ?? null, cancellationReason: tender.cancellationReason ?? null, regions,
    },
    amendments: amendments.map((a) => ({ number: a.number, issuedAt: a.createdAt, reason: a.reason, changes: a.changes })),
    answeredAt: answered.flatMap((q) => (q.answeredAt ? [q.answeredAt] : [])),
    tenderers, award, notified, contracts,
  }, { ocidPrefix: setting('OCDS_OCID_PREFIX'), uri: `${publicUrl}/api/tenders/${tender.id}/ocds` });
  return { reference: tender.reference, content };
}
