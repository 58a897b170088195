import type { EntityManager } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import type { Pool } from 'pg';
import { describeAwardBasis } from '@shared/award-basis';
import type { RegionInput } from '@shared/bids';
import type { InvitationInput, TenderInput, TenderListQuery, TenderStatus, TenderSummary, TenderView } from '@shared/tenders';
import { Amendment, Bid, Invitation, Notice, Region, Tender, User, VendorOrganisation } from '../entities';
import { ConflictError, NotFoundError, ValidationError } from '../http/errors';
import { enqueueMail, QUEUES } from '../jobs/queue';
import { renderMail } from '../mail/templates';
import { addPerson, registerOrganisation, sendAfterCommit, type MailOut } from './people.service';
import { audit } from './audit.service';
import { AFTER_AWARD, tenderListJson, tenderListPage, vendorListWithSession, type TenderListFilter, type TenderListJsonRow } from './queries/tenders.queries';
import type { ReadWithSession } from '../auth/session.queries';
import { JsonText } from '../http/route';
import { CLOSING_GRACE_MS, closeIfDue, findVisibleTender, lockTender, tenderOwnerScope } from './tender-access';
import type { Principal } from '../auth/session-user';
import { LIVE_BID_STATUSES, statusesBefore } from '@shared/tenders';
import { isWholeMultiple } from '@shared/award';

export interface TenderDeps {
  em: EntityManager;
  boss: PgBoss;
  publicUrl: string;
}

export function tenderSummary(t: Tender, regions: Region[]): TenderSummary {
  return {
    id: t.id,
    reference: t.reference,
    title: t.title,
    commodity: t.commodity,
    unit: t.unit,
    currency: t.currency,
    status: t.status,
    closesAt: t.closesAt.toISOString(),
    timeZone: t.timeZone,
    regionCount: regions.length,
    totalForecast: regions.reduce((sum, r) => sum + r.forecast, 0),
  };
}

export function regionInputs(tender: Tender): RegionInput[] {
  return tender.regions.getItems().map((r) => ({ code: r.code, name: r.name, forecast: r.forecast }));
}

/** One page of the tender list as the JSON of `TenderPage`, written by PostgreSQL (queries/tenders.queries.ts). */
export async function listTenders(pool: Pool, user: Principal, query: TenderListQuery, readWithSession?: Record<string, unknown>): Promise<JsonText> {
  // No write here: closing (and its audit entry) is the close job's and the bid save's. Until the
  // job has run, a tender past its closing time is listed as closed all the same (CURRENT_STATUS).
  // One prepared statement, a page at a time, counts and totals by PostgreSQL.
  const vendor = user.role === 'vendor' ? user.vendorOrganisation!.id : null;
  const filter = listFilter(vendor, tenderOwnerScope(user), query);
  // A vendor's page may have come with its session, in the same statement (`vendorListReadWithSession`).
  const { items, total } = vendor && readWithSession
    ? await tenderListPage(pool, filter, readWithSession as unknown as TenderListJsonRow)
    : await tenderListJson(pool, filter);
  // The keys and order of TenderPage; the numbers are integers (validated query, count).
  return new JsonText(`{"items":${items},"total":${total},"page":${query.page},"size":${query.size}}`);
}

function listFilter(vendorOrganisationId: string | null, ownerId: string | null, query: TenderListQuery): TenderListFilter {
  return {
    vendorOrganisationId, ownerId, status: query.status, q: query.q,
    page: query.page, size: query.size, sort: query.sort, dir: query.dir ?? (query.sort === 'closesAt' ? 'desc' : 'asc'),
  };
}

/**
 * The vendor's page of the list, read with the session (`readsWithSession` of `GET /tenders`): the
 * vendor is the session person's organisation, and a person who is not a vendor gets no tender
 * from it (and reads its own list as before).
 */
export function vendorListReadWithSession(query: TenderListQuery, sid: string): ReadWithSession {
  return vendorListWithSession(listFilter('(the session\'s)', null, query), sid);
}

export async function tenderView(em: EntityManager, user: User, id: string): Promise<TenderView> {
  const tender = await findVisibleTender(em, user, id);
  const regions = tender.regions.getItems();
  const view: TenderView = {
    ...tenderSummary(tender, regions),
    description: tender.description,
    locale: tender.locale,
    standstillDays: tender.standstillDays,
    standstillExemption: tender.standstillExemption ?? null,
    closureDays: tender.closureDays,
    standstillEndsAt: tender.standstillEndsAt?.toISOString() ?? null,
    publishedAt: tender.publishedAt?.toISOString() ?? null,
    closedAt: tender.closedAt?.toISOString() ?? null,
    regions: regions.map((r) => ({ code: r.code, name: r.name, forecast: r.forecast })),
    awardBasis: tender.awardBasis,
    buyingBody: tender.buyingBody ?? null,
    bidValidityDays: tender.bidValidityDays,
    clarificationsCloseAt: clarificationsCloseAt(tender).toISOString(),
    abnormallyLowPercent: tender.abnormallyLowPercent,
    amendments: (await em.find(Amendment, { tender }, { orderBy: { number: 'asc' } }))
      .map((a) => ({ number: a.number, issuedAt: a.createdAt.toISOString(), reason: a.reason, changes: a.changes })),
    cancellation: tender.cancelledAt ? { at: tender.cancelledAt.toISOString(), reason: tender.cancellationReason ?? '' } : null,
  };
  if (user.role !== 'vendor') view.estimatedValue = tender.estimatedValue ?? null;
  if (user.role === 'vendor') {
    const bid = await em.findOne(Bid, { tender, vendorOrganisation: user.vendorOrganisation! });
    view.myBidStatus = bid?.status ?? null;
    view.status = await vendorStatus(em, tender, user.vendorOrganisation!.id);
    // The procedure's internal dates and ground are the buyer's; a vendor reads them in its letter.
    view.closureDays = [];
    view.standstillEndsAt = view.status === 'closed' ? null : view.standstillEndsAt;
  } else {
    const invitations = await em.find(Invitation, { tender }, { populate: ['vendorOrganisation'], orderBy: { vendorOrganisation: { name: 'asc' } } });
    view.invitations = invitations.map((i) => ({
      vendorOrganisation: { id: i.vendorOrganisation.id, name: i.vendorOrganisation.name, sme: i.vendorOrganisation.sme },
      invitedAt: i.createdAt.toISOString(),
    }));
    view.submittedBids = await em.count(Bid, { tender, status: { $in: [...LIVE_BID_STATUSES] } });
  }
  return view;
}

/**
 * A vendor sees the outcome once its own letter has been sent: until then an approved award reads
 * as closed (the status is the SQL of `VENDOR_STATUS` in lists).
 */
async function vendorStatus(em: EntityManager, tender: Tender, vendorId: string): Promise<TenderStatus> {
  if (!AFTER_AWARD.includes(tender.status)) return tender.status;
  return (await em.count(Notice, { tender, vendorOrganisation: vendorId, status: 'sent' })) ? tender.status : 'closed';
}

/** A standstill of 0 days needs its exemption ground (400 naming `standstillExemption`). */
function checkStandstill(input: TenderInput): void {
  if (input.standstillDays === 0 && !input.standstillExemption?.trim()) {
    throw new ValidationError([{ field: 'standstillExemption', message: 'A standstill of 0 days needs the ground of its exemption.' }]);
  }
}

function checkClosingTime(input: TenderInput): Date {
  const closesAt = new Date(input.closesAt);
  if (closesAt.getTime() <= Date.now() + 60_000) {
    throw new ValidationError([{ field: 'closesAt', message: 'Closing time must be in the future.' }]);
  }
  return closesAt;
}

/**
 * The award basis must fit the tender it is published with: sole-awarded regions are its regions,
 * the minimum number of vendors is not above the maximum, and with an award increment every
 * forecast is a whole multiple of it (the engine awards nothing else). A clarification deadline
 * set by hand comes before the closing time.
 */
function checkAwardBasis(input: TenderInput): void {
  const basis = input.awardBasis;
  const codes = new Set(input.regions.map((r) => r.code));
  const errors = basis.soleRegions.flatMap((code, i) => (codes.has(code) ? [] : [{ field: `awardBasis.soleRegions[${i}]`, message: `Region ${code} is not one of this tender's regions.` }]));
  basis.soleRegions.forEach((code, i) => {
    if (basis.soleRegions.indexOf(code) !== i) errors.push({ field: `awardBasis.soleRegions[${i}]`, message: `Region ${code} is listed twice.` });
  });
  if (basis.minVendors !== undefined && basis.maxVendors !== undefined && basis.minVendors > basis.maxVendors) {
    errors.push({ field: 'awardBasis.minVendors', message: `Minimum number of vendors (${basis.minVendors}) is above the maximum (${basis.maxVendors}).` });
  }
  const step = basis.awardIncrement;
  if (step !== undefined) {
    const off = input.regions.flatMap((r, i) => (isWholeMultiple(r.forecast, step) ? [] : [i]));
    if (off.length === input.regions.length && off.length > 0) {
      errors.push({ field: 'awardBasis.awardIncrement', message: `No region's forecast is a whole multiple of the award increment ${step} ${input.unit}.` });
    } else {
      for (const i of off) {
        errors.push({ field: `regions[${i}].forecast`, message: `With an award increment of ${step} ${input.unit}, the forecast must be a whole multiple of it.` });
      }
    }
  }
  if (input.clarificationsCloseAt && new Date(input.clarificationsCloseAt).getTime() >= new Date(input.closesAt).getTime()) {
    errors.push({ field: 'clarificationsCloseAt', message: 'The clarification deadline must be before the closing time.' });
  }
  if (errors.length) throw new ValidationError(errors);
}

/** The tender's own columns from the input (regions are rows of their own). */
function tenderFields(input: TenderInput) {
  const { regions: _regions, clarificationsCloseAt, standstillExemption, ...fields } = input;
  return {
    ...fields, clarificationsCloseAt: clarificationsCloseAt ? new Date(clarificationsCloseAt) : null,
    // The ground is kept only where it applies.
    standstillExemption: input.standstillDays === 0 ? standstillExemption?.trim() ?? null : null,
  };
}

/** Vendors' questions close at the stored deadline, else 5 days before closing. */
export function clarificationsCloseAt(t: Tender): Date {
  return t.clarificationsCloseAt ?? new Date(t.closesAt.getTime() - 5 * 24 * 3600_000);
}

function writeRegions(em: EntityManager, tender: Tender, regions: RegionInput[]): void {
  regions.forEach((r, position) => em.create(Region, { tender, code: r.code, name: r.name, forecast: r.forecast, position }));
}

export async function createTender(em: EntityManager, user: User, input: TenderInput): Promise<TenderView> {
  const closesAt = checkClosingTime(input);
  checkStandstill(input);
  checkAwardBasis(input);
  const id = await em.transactional(async (tx) => {
    if (await tx.count(Tender, { reference: input.reference })) {
      throw new ConflictError('A tender with this reference exists.', [{ field: 'reference', message: 'This reference is already used.' }]);
    }
    const tender = tx.create(Tender, { ...tenderFields(input), closesAt, createdBy: user });
    writeRegions(tx, tender, input.regions);
    await tx.flush();
    await audit(tx, { tenderId: tender.id, actor: user, action: 'tender.created', subject: 'tender', after: input });
    return tender.id;
  });
  return tenderView(em.fork(), user, id);
}

/** Drafts only: once published, vendors price what they were shown. */
export async function updateTender(em: EntityManager, user: User, id: string, input: TenderInput): Promise<TenderView> {
  const closesAt = checkClosingTime(input);
  checkStandstill(input);
  checkAwardBasis(input);
  await em.transactional(async (tx) => {
    await lockTender(tx, user, id, ['draft'], 'Only a draft tender can be edited; this one is published.');
    const tender = await tx.findOneOrFail(Tender, { id });
    if (input.reference !== tender.reference && (await tx.count(Tender, { reference: input.reference }))) {
      throw new ConflictError('A tender with this reference exists.', [{ field: 'reference', message: 'This reference is already used.' }]);
    }
    const before = { reference: tender.reference, title: tender.title, closesAt: tender.closesAt.toISOString() };
    tx.assign(tender, { ...tenderFields(input), closesAt });
    await tx.nativeDelete(Region, { tender });
    writeRegions(tx, tender, input.regions);
    await tx.flush();
    await audit(tx, { tenderId: tender.id, actor: user, action: 'tender.updated', subject: 'tender', before, after: input });
  });
  return tenderView(em.fork(), user, id);
}

/**
 * The buying body's closure days, editable until the award is approved (the approval fixes the
 * standstill end from them). Under the tender's lock, with its audit entry.
 */
export async function setClosureDays(em: EntityManager, user: User, id: string, closureDays: string[]): Promise<TenderView> {
  await em.transactional(async (tx) => {
    await lockTender(tx, user, id, ['draft', 'open', 'closed'], 'The award is approved: its standstill end is fixed and closure days can no longer change.');
    const tender = await tx.findOneOrFail(Tender, { id });
    const before = { closureDays: tender.closureDays };
    await tx.nativeUpdate(Tender, { id }, { closureDays, updatedAt: new Date() });
    await audit(tx, { tenderId: id, actor: user, action: 'tender.closure-days', subject: 'tender', before, after: { closureDays } });
  });
  return tenderView(em.fork(), user, id);
}

/** Invites organisations (and optionally a new vendor contact, who gets an account link). */
export async function inviteVendors(deps: TenderDeps, user: User, id: string, input: InvitationInput): Promise<TenderView> {
  const { em } = deps;
  const tender = await findVisibleTender(em, user, id);
  if (tender.status !== 'draft' && tender.status !== 'open') throw new ConflictError('Vendors can be invited only before closing.');
  const orgIds = [...new Set(input.vendorOrganisationIds)];
  // The new organisation, its contact's account, the invitations and their audit entries commit
  // together; the contact's e-mail is queued only after that. A refused request leaves nothing.
  const { added, mails } = await em.transactional(async (tx) => {
    await lockTender(tx, user, tender.id, ['draft', 'open'], 'Vendors can be invited only before closing.');
    const mails: MailOut[] = [];
    const newOrgIds: string[] = [];
    if (input.newVendor) {
      const nv = input.newVendor;
      const org = await registerOrganisation(tx, { name: nv.organisationName, registrationNumber: nv.registrationNumber, sme: nv.sme, contactEmail: nv.contactEmail }, user);
      const person = await addPerson(tx, deps, { name: nv.contactName, email: nv.contactEmail, role: 'vendor', vendorOrganisationId: org.id }, user);
      mails.push(...person.mails);
      newOrgIds.push(org.id);
    }
    const orgs = await tx.find(VendorOrganisation, { id: { $in: orgIds } });
    if (orgs.length !== orgIds.length) {
      const missing = orgIds.findIndex((oid) => !orgs.some((o) => o.id === oid));
      throw new ValidationError([{ field: `vendorOrganisationIds[${missing}]`, message: 'This vendor organisation does not exist.' }]);
    }
    orgs.push(...(await tx.find(VendorOrganisation, { id: { $in: newOrgIds } })));
    const allIds = orgs.map((o) => o.id);
    const existing = await tx.find(Invitation, { tender: tender.id, vendorOrganisation: { $in: allIds } });
    const fresh = orgs.filter((o) => !existing.some((e) => e.vendorOrganisation.id === o.id));
    const created = fresh.map((o) => tx.create(Invitation, { tender: tender.id, vendorOrganisation: o, invitedBy: user }));
    await tx.flush();
    if (fresh.length) {
      await audit(tx, { tenderId: tender.id, actor: user, action: 'invitations.added', subject: 'invitations', detail: { vendors: fresh.map((o) => o.name) } });
    }
    return { added: created, mails };
  });
  await sendAfterCommit(deps.boss, mails);
  if (tender.status === 'open') await notifyInvited(deps, tender, added.map((i) => i.id));
  return tenderView(em.fork(), user, id);
}

export async function removeInvitation(em: EntityManager, user: User, id: string, orgId: string): Promise<TenderView> {
  const tender = await findVisibleTender(em, user, id);
  if (tender.status !== 'draft') throw new ConflictError('Invitations can be withdrawn only while the tender is a draft.');
  await em.transactional(async (tx) => {
    await lockTender(tx, user, tender.id, ['draft'], 'Invitations can be withdrawn only while the tender is a draft.');
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
    await lockTender(tx, user, id, statusesBefore('open'), 'This tender is already published.');
    const t = await tx.findOneOrFail(Tender, { id }, { populate: ['regions'] });
    const problems = [];
    if (t.closesAt.getTime() <= Date.now() + 60_000) problems.push({ field: 'closesAt', message: 'Closing time has passed; set a new one before publishing.' });
    if (t.regions.length === 0) problems.push({ field: 'regions', message: 'Add at least one region.' });
    if (!(await tx.count(Invitation, { tender: t }))) problems.push({ field: 'invitations', message: 'Invite at least one vendor.' });
    if (!t.buyingBody) problems.push({ field: 'buyingBody', message: 'Name the buying body (name, address, contact e-mail, country) before publishing.' });
    if (problems.length) throw new ValidationError(problems, 'The tender is not ready to publish.');
    t.status = 'open';
    t.publishedAt = new Date();
    await tx.flush();
    await audit(tx, { tenderId: t.id, actor: user, action: 'tender.published', subject: 'tender', before: { status: 'draft' }, after: { status: 'open', closesAt: t.closesAt.toISOString() } });
    return t;
  });
  // Closed (and opened) once bids received before the closing time are in: tender-access.ts.
  await deps.boss.send(QUEUES.tenderClose, { tenderId: tender.id }, { startAfter: new Date(tender.closesAt.getTime() + CLOSING_GRACE_MS), singletonKey: `close-${tender.id}` });
  const invitations = await em.fork().find(Invitation, { tender: tender.id });
  await notifyInvited(deps, tender, invitations.map((i) => i.id));
  return tenderView(em.fork(), user, id);
}

/** One e-mail per active vendor user of each invited organisation. */
async function notifyInvited(deps: TenderDeps, tender: Tender, invitationIds: string[]): Promise<void> {
  if (!invitationIds.length) return;
  const em = deps.em.fork();
  const invitations = await em.find(Invitation, { id: { $in: invitationIds } }, { populate: ['vendorOrganisation'] });
  // The same sentences as the tender page and the bid workbook (shared/award-basis.ts).
  const regions = await em.find(Region, { tender: tender.id }, { orderBy: { position: 'asc' } });
  const basis = describeAwardBasis(tender.awardBasis, { unit: tender.unit, regions });
  for (const inv of invitations) {
    // Only approved members: a person awaiting the organisation's approval learns nothing of it.
    const people = await em.find(User, { vendorOrganisation: inv.vendorOrganisation, active: true, role: 'vendor', membership: 'approved' });
    for (const person of people) {
      const mail = renderMail('invitation', `Invitation to tender ${tender.reference}: ${tender.title}`, {
        name: person.name,
        organisation: inv.vendorOrganisation.name,
        reference: tender.reference,
        title: tender.title,
        commodity: tender.commodity,
        closesAt: tender.closesAt,
        timeZone: tender.timeZone,
        basis,
        link: `${deps.publicUrl}/tenders/${tender.id}`,
      });
      await enqueueMail(deps.boss, { to: person.email, ...mail }, `invite-${inv.id}-${person.id}`);
    }
    inv.notifiedAt = new Date();
  }
  await em.flush();
}

export { closeIfDue };
