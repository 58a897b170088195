import { LockMode, type EntityManager } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import type { z } from 'zod';
import type { RegionInput } from '@shared/bids';
import type { BidStatus, InvitationInput, TenderInput, TenderSummary, TenderView, tenderListQuerySchema } from '@shared/tenders';
import { Bid, Invitation, Region, Tender, User, VendorOrganisation } from '../entities';
import { ConflictError, NotFoundError, ValidationError } from '../http/errors';
import { enqueueMail, QUEUES } from '../jobs/queue';
import { renderMail } from '../mail/templates';
import { createOrganisation, invitePerson } from './people.service';
import { audit } from './audit.service';
import { escapeLike } from './like';
import { closeAllDue, closeIfDue, findVisibleTender } from './tender-access';

export interface TenderDeps {
  em: EntityManager;
  boss: PgBoss;
  publicUrl: string;
}

const LIVE_BID: BidStatus[] = ['submitted', 'revised'];

export function tenderSummary(t: Tender, regions: Region[]): TenderSummary {
  return summaryWithStats(t, regions.length, regions.reduce((s, r) => s + r.forecast, 0));
}

function summaryWithStats(t: Tender, regionCount: number, totalForecast: number): TenderSummary {
  return {
    id: t.id,
    reference: t.reference,
    title: t.title,
    commodity: t.commodity,
    unit: t.unit,
    currency: t.currency,
    status: t.status,
    closesAt: t.closesAt.toISOString(),
    regionCount,
    totalForecast,
  };
}

export function regionInputs(tender: Tender): RegionInput[] {
  return tender.regions.getItems().map((r) => ({ code: r.code, name: r.name, forecast: r.forecast }));
}

export async function listTenders(em: EntityManager, user: User, query: z.infer<typeof tenderListQuerySchema>): Promise<TenderSummary[]> {
  // Close what is due first (with its audit entries), so lists never show an open tender past its closing time.
  await closeAllDue(em);
  const where: Record<string, unknown> = {};
  if (query.status) where['status'] = query.status;
  if (query.q) {
    const like = `%${escapeLike(query.q)}%`;
    where['$or'] = [{ reference: { $ilike: like } }, { title: { $ilike: like } }, { commodity: { $ilike: like } }];
  }
  let myBids = new Map<string, Bid>();
  if (user.role === 'vendor') {
    const invitations = await em.find(Invitation, { vendorOrganisation: user.vendorOrganisation! }, { fields: ['tender'] });
    where['id'] = { $in: invitations.map((i) => i.tender.id) };
    where['status'] = query.status && query.status !== 'draft' ? query.status : { $ne: 'draft' };
    const bids = await em.find(Bid, { vendorOrganisation: user.vendorOrganisation! });
    myBids = new Map(bids.map((b) => [b.tender.id, b]));
  }
  const tenders = await em.find(Tender, where, { orderBy: { closesAt: 'desc' } });
  // Count and total from PostgreSQL: populating every region of every listed tender made the list
  // the slowest vendor request (bench:api, phase a).
  const stats = new Map<string, { n: number; total: number }>();
  if (tenders.length) {
    const rows = await em.execute<{ tender_id: string; n: number; total: string }[]>(
      `select tender_id, count(*)::int as n, coalesce(sum(forecast), 0) as total from region where tender_id in (${tenders.map(() => '?').join(', ')}) group by tender_id`,
      tenders.map((t) => t.id),
    );
    for (const r of rows) stats.set(r.tender_id, { n: r.n, total: Number(r.total) });
  }
  return tenders.map((t) => ({
    ...summaryWithStats(t, stats.get(t.id)?.n ?? 0, stats.get(t.id)?.total ?? 0),
    ...(user.role === 'vendor' ? { myBidStatus: myBids.get(t.id)?.status ?? null } : {}),
  }));
}

export async function tenderView(em: EntityManager, user: User, id: string): Promise<TenderView> {
  const tender = await findVisibleTender(em, user, id);
  const regions = tender.regions.getItems();
  const view: TenderView = {
    ...tenderSummary(tender, regions),
    description: tender.description,
    locale: tender.locale,
    standstillDays: tender.standstillDays,
    publishedAt: tender.publishedAt?.toISOString() ?? null,
    closedAt: tender.closedAt?.toISOString() ?? null,
    regions: regions.map((r) => ({ code: r.code, name: r.name, forecast: r.forecast })),
  };
  if (user.role === 'vendor') {
    const bid = await em.findOne(Bid, { tender, vendorOrganisation: user.vendorOrganisation! });
    view.myBidStatus = bid?.status ?? null;
  } else {
    const invitations = await em.find(Invitation, { tender }, { populate: ['vendorOrganisation'], orderBy: { vendorOrganisation: { name: 'asc' } } });
    view.invitations = invitations.map((i) => ({
      vendorOrganisation: { id: i.vendorOrganisation.id, name: i.vendorOrganisation.name, sme: i.vendorOrganisation.sme },
      invitedAt: i.createdAt.toISOString(),
    }));
    view.submittedBids = await em.count(Bid, { tender, status: { $in: LIVE_BID } });
  }
  return view;
}

function checkClosingTime(input: TenderInput): Date {
  const closesAt = new Date(input.closesAt);
  if (closesAt.getTime() <= Date.now() + 60_000) {
    throw new ValidationError([{ field: 'closesAt', message: 'Closing time must be in the future.' }]);
  }
  return closesAt;
}

function writeRegions(em: EntityManager, tender: Tender, regions: RegionInput[]): void {
  regions.forEach((r, position) => em.create(Region, { tender, code: r.code, name: r.name, forecast: r.forecast, position }));
}

export async function createTender(em: EntityManager, user: User, input: TenderInput): Promise<TenderView> {
  const closesAt = checkClosingTime(input);
  const id = await em.transactional(async (tx) => {
    if (await tx.count(Tender, { reference: input.reference })) {
      throw new ConflictError('A tender with this reference exists.', [{ field: 'reference', message: 'This reference is already used.' }]);
    }
    const { regions, ...fields } = input;
    const tender = tx.create(Tender, { ...fields, closesAt, createdBy: user });
    writeRegions(tx, tender, regions);
    await tx.flush();
    await audit(tx, { tenderId: tender.id, actor: user, action: 'tender.created', subject: 'tender', after: input });
    return tender.id;
  });
  return tenderView(em.fork(), user, id);
}

/** Drafts only: once published, vendors price what they were shown. */
export async function updateTender(em: EntityManager, user: User, id: string, input: TenderInput): Promise<TenderView> {
  const closesAt = checkClosingTime(input);
  await em.transactional(async (tx) => {
    const tender = await tx.findOne(Tender, { id }, { lockMode: LockMode.PESSIMISTIC_WRITE });
    if (!tender) throw new NotFoundError('The tender');
    if (tender.status !== 'draft') throw new ConflictError('Only a draft tender can be edited; this one is published.');
    if (input.reference !== tender.reference && (await tx.count(Tender, { reference: input.reference }))) {
      throw new ConflictError('A tender with this reference exists.', [{ field: 'reference', message: 'This reference is already used.' }]);
    }
    const { regions, ...fields } = input;
    const before = { reference: tender.reference, title: tender.title, closesAt: tender.closesAt.toISOString() };
    tx.assign(tender, { ...fields, closesAt });
    await tx.nativeDelete(Region, { tender });
    writeRegions(tx, tender, regions);
    await tx.flush();
    await audit(tx, { tenderId: tender.id, actor: user, action: 'tender.updated', subject: 'tender', before, after: input });
  });
  return tenderView(em.fork(), user, id);
}

/** Invites organisations (and optionally a new vendor contact, who gets an account link). */
export async function inviteVendors(deps: TenderDeps, user: User, id: string, input: InvitationInput): Promise<TenderView> {
  const { em } = deps;
  const tender = await findVisibleTender(em, user, id);
  if (tender.status !== 'draft' && tender.status !== 'open') throw new ConflictError('Vendors can be invited only before closing.');
  const orgIds = [...new Set(input.vendorOrganisationIds)];
  if (input.newVendor) {
    const nv = input.newVendor;
    const org = await createOrganisation(em.fork(), { name: nv.organisationName, registrationNumber: nv.registrationNumber, sme: nv.sme, contactEmail: nv.contactEmail });
    await invitePerson({ em: em.fork(), boss: deps.boss, publicUrl: deps.publicUrl }, { name: nv.contactName, email: nv.contactEmail, role: 'vendor', vendorOrganisationId: org.id }, user);
    orgIds.push(org.id);
  }
  const added = await em.transactional(async (tx) => {
    const orgs = await tx.find(VendorOrganisation, { id: { $in: orgIds } });
    if (orgs.length !== orgIds.length) {
      const missing = orgIds.findIndex((oid) => !orgs.some((o) => o.id === oid));
      throw new ValidationError([{ field: `vendorOrganisationIds[${missing}]`, message: 'This vendor organisation does not exist.' }]);
    }
    const existing = await tx.find(Invitation, { tender: tender.id, vendorOrganisation: { $in: orgIds } });
    const fresh = orgs.filter((o) => !existing.some((e) => e.vendorOrganisation.id === o.id));
    const created = fresh.map((o) => tx.create(Invitation, { tender: tender.id, vendorOrganisation: o, invitedBy: user }));
    await tx.flush();
    if (fresh.length) {
      await audit(tx, { tenderId: tender.id, actor: user, action: 'invitations.added', subject: 'invitations', detail: { vendors: fresh.map((o) => o.name) } });
    }
    return created;
  });
  if (tender.status === 'open') await notifyInvited(deps, tender, added.map((i) => i.id));
  return tenderView(em.fork(), user, id);
}

export async function removeInvitation(em: EntityManager, user: User, id: string, orgId: string): Promise<TenderView> {
  const tender = await findVisibleTender(em, user, id);
  if (tender.status !== 'draft') throw new ConflictError('Invitations can be withdrawn only while the tender is a draft.');
  await em.transactional(async (tx) => {
    const removed = await tx.nativeDelete(Invitation, { tender: tender.id, vendorOrganisation: orgId });
    if (!removed) throw new NotFoundError('The invitation');
    await audit(tx, { tenderId: tender.id, actor: user, action: 'invitation.withdrawn', subject: 'invitations', detail: { vendorOrganisation: orgId } });
  });
  return tenderView(em.fork(), user, id);
}

/** draft → open: checks it is complete, e-mails every invited vendor and schedules the closing. */
export async function publishTender(deps: TenderDeps, user: User, id: string): Promise<TenderView> {
  const { em } = deps;
  const tender = await em.transactional(async (tx) => {
    const t = await tx.findOne(Tender, { id }, { lockMode: LockMode.PESSIMISTIC_WRITE });
    if (!t) throw new NotFoundError('The tender');
    await tx.populate(t, ['regions']);
    if (t.status !== 'draft') throw new ConflictError('This tender is already published.');
    const problems = [];
    if (t.closesAt.getTime() <= Date.now() + 60_000) problems.push({ field: 'closesAt', message: 'Closing time has passed; set a new one before publishing.' });
    if (t.regions.length === 0) problems.push({ field: 'regions', message: 'Add at least one region.' });
    if (!(await tx.count(Invitation, { tender: t }))) problems.push({ field: 'invitations', message: 'Invite at least one vendor.' });
    if (problems.length) throw new ValidationError(problems, 'The tender is not ready to publish.');
    t.status = 'open';
    t.publishedAt = new Date();
    await tx.flush();
    await audit(tx, { tenderId: t.id, actor: user, action: 'tender.published', subject: 'tender', before: { status: 'draft' }, after: { status: 'open', closesAt: t.closesAt.toISOString() } });
    return t;
  });
  await deps.boss.send(QUEUES.tenderClose, { tenderId: tender.id }, { startAfter: tender.closesAt, singletonKey: `close-${tender.id}` });
  const invitations = await em.fork().find(Invitation, { tender: tender.id });
  await notifyInvited(deps, tender, invitations.map((i) => i.id));
  return tenderView(em.fork(), user, id);
}

/** One e-mail per active vendor user of each invited organisation. */
async function notifyInvited(deps: TenderDeps, tender: Tender, invitationIds: string[]): Promise<void> {
  if (!invitationIds.length) return;
  const em = deps.em.fork();
  const invitations = await em.find(Invitation, { id: { $in: invitationIds } }, { populate: ['vendorOrganisation'] });
  for (const inv of invitations) {
    const people = await em.find(User, { vendorOrganisation: inv.vendorOrganisation, active: true, role: 'vendor' });
    for (const person of people) {
      const mail = renderMail('invitation', `Invitation to tender ${tender.reference}: ${tender.title}`, {
        name: person.name,
        organisation: inv.vendorOrganisation.name,
        reference: tender.reference,
        title: tender.title,
        commodity: tender.commodity,
        closesAt: tender.closesAt.toISOString().slice(0, 16).replace('T', ' '),
        link: `${deps.publicUrl}/tenders/${tender.id}`,
      });
      await enqueueMail(deps.boss, { to: person.email, ...mail }, `invite-${inv.id}-${person.id}`);
    }
    inv.notifiedAt = new Date();
  }
  await em.flush();
}

export { closeIfDue };
