import type { EntityManager, FilterQuery } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import type { NoticePreview, NoticeStatus, NoticeSummary, NoticeView } from '@shared/notices';
import { Notice, Tender, type User } from '../../entities';
import { ConflictError, NotFoundError } from '../../http/errors';
import { queueNotice } from '../../jobs/queue';
import { audit } from '../audit.service';
import { unsentNoticeCount } from '../queries/notices.queries';
import { findVisibleTender, lockTender, tenderOwnerScope } from '../tender-access';
import { approvedRun, composeLetters } from './letters';
import { statusesBefore } from '@shared/tenders';

const NOT_AWARDED = 'Notices go out once compliance has approved an award for this tender.';

export interface NoticeDeps {
  em: EntityManager;
  boss: PgBoss;
}

function summary(n: Notice): NoticeSummary {
  return {
    id: n.id, tenderId: n.tender.id, tenderReference: n.tender.reference, tenderTitle: n.tender.title,
    vendor: { id: n.vendorOrganisation.id, name: n.vendorOrganisation.name }, kind: n.kind, subject: n.subject, status: n.status,
    attempts: n.attempts, lastError: n.lastError ?? null, queuedAt: n.createdAt.toISOString(), sentAt: n.sentAt?.toISOString() ?? null,
    standstillEndsAt: n.standstillEndsAt.toISOString(), timeZone: n.tender.timeZone, locale: n.tender.locale,
  };
}

export async function previewNotices(em: EntityManager, user: User, tenderId: string): Promise<NoticePreview[]> {
  const tender = await findVisibleTender(em, user, tenderId);
  const letters = await composeLetters(em, tender);
  return letters.map((l) => ({ vendor: l.vendor, kind: l.kind, to: l.to, subject: l.subject, html: l.html, text: l.text }));
}

/**
 * The letters are composed from stored inputs only (see composeLetters), so what is queued here is
 * byte for byte what the preview showed; the job then sends the stored letter, however late.
 *
 * Queues one notice per bidder of the approved award, in one transaction under the tender's lock:
 * a notice is never duplicated (also a unique row per tender and vendor). Sending again, or two sends
 * racing, gets 409 for the second: its notices are already queued.
 */
export async function sendNotices(deps: NoticeDeps, user: User, tenderId: string): Promise<{ queued: number }> {
  const { em } = deps;
  const tender = await findVisibleTender(em, user, tenderId);
  if (tender.status !== 'awarded' && tender.status !== 'notified') throw new ConflictError(NOT_AWARDED);
  const run = await approvedRun(em, tender);
  const letters = await composeLetters(em, tender);
  const created = await em.transactional(async (tx) => {
    await lockTender(tx, user, tenderId, ['awarded', 'notified'], NOT_AWARDED);
    const existing = new Set((await tx.find(Notice, { tender: tenderId })).map((n) => n.vendorOrganisation.id));
    const fresh = letters.filter((l) => !existing.has(l.vendor.id)).map((l) => tx.create(Notice, {
      tender: tenderId, run, vendorOrganisation: l.vendor.id, kind: l.kind, toAddresses: l.to, subject: l.subject,
      html: l.html, text: l.text, standstillEndsAt: l.standstillEndsAt,
    }));
    if (!fresh.length) throw new ConflictError('The notices of this award have already been queued; each bidder receives its notice once.');
    await tx.flush();
    await audit(tx, { tenderId, actor: user, action: 'notices.queued', subject: `${fresh.length} notices`, detail: { award: fresh.filter((n) => n.kind === 'award').length, regret: fresh.filter((n) => n.kind === 'regret').length, exclusion: fresh.filter((n) => n.kind === 'exclusion').length } });
    return fresh.map((n) => n.id);
  });
  for (const id of created) await queueNotice(deps.boss, id);
  return { queued: created.length };
}

export async function listNotices(em: EntityManager, user: User, query: { tenderId?: string; status?: NoticeStatus }): Promise<NoticeSummary[]> {
  const where: FilterQuery<Notice> = {};
  if (query.tenderId) where.tender = query.tenderId;
  if (query.status) where.status = query.status;
  if (user.role === 'vendor') {
    where.vendorOrganisation = user.vendorOrganisation!.id;
    // A vendor reads its letter once it has been sent.
    where.status = 'sent';
  } else if (tenderOwnerScope(user)) {
    where.tender = { ...(query.tenderId ? { id: query.tenderId } : {}), createdBy: tenderOwnerScope(user) };
  }
  const notices = await em.find(Notice, where, { populate: ['tender', 'vendorOrganisation'], orderBy: { createdAt: 'desc', vendorOrganisation: { name: 'asc' } } });
  return notices.map(summary);
}

export async function readNotice(em: EntityManager, user: User, id: string): Promise<NoticeView> {
  const n = await em.findOne(Notice, { id }, { populate: ['tender', 'vendorOrganisation'] });
  const visible = n && (user.role === 'vendor'
    ? n.vendorOrganisation.id === user.vendorOrganisation?.id && n.status === 'sent'
    : (tenderOwnerScope(user) ?? n.tender.createdBy.id) === n.tender.createdBy.id);
  if (!n || !visible) throw new NotFoundError('The notice');
  return { ...summary(n), html: n.html, text: n.text };
}

/** Marks the tender notified once every one of its notices is sent. */
export async function notifiedIfAllSent(em: EntityManager, tenderId: string): Promise<void> {
  await em.transactional(async (tx) => {
    if ((await unsentNoticeCount(tx, tenderId)) > 0) return;
    const changed = await tx.nativeUpdate(Tender, { id: tenderId, status: { $in: statusesBefore('notified') } }, { status: 'notified' });
    if (changed) await audit(tx, { tenderId, actor: null, action: 'tender.notified', subject: 'tender', detail: {}, before: { status: 'awarded' }, after: { status: 'notified' } });
  });
}
