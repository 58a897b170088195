import type { EntityManager } from '@mikro-orm/postgresql';
import { CLOSING_REMINDER_HOURS } from '@shared/notifications';
import { LIVE_BID_STATUSES } from '@shared/tenders';
import { formatInZone } from '@shared/time-zone';
import { renderMail } from '../../mail/templates';
import { sqlList } from '../sql';
import { notifyOnce, type NotifyDeps } from './notify';

const HOUR_MS = 3_600_000;

interface DueTender {
  id: string;
  reference: string;
  title: string;
  closes_at: Date | string;
  time_zone: string;
}

/**
 * Closing reminders, 48 h and 2 h before closing (once each), to every approved, active person of
 * each invited organisation that has no bid in yet (a draft, a withdrawn bid or nothing). A tender
 * is due for a reminder from that many hours before closing until the next reminder (or closing), and only if it was
 * published earlier than that (a tender published 30 h before closing gets no "48 h" reminder: the
 * invitation has just told its vendors). Judged by `now`, this process's clock, as closing is.
 */
export async function sendClosingReminders(em: EntityManager, deps: NotifyDeps, now = new Date()): Promise<number> {
  let queued = 0;
  // Largest first; each reminder is due until the next one is (a 48-hour reminder the job missed is
  // not sent once the 2-hour one is due).
  const windows = (Object.entries(CLOSING_REMINDER_HOURS) as [keyof typeof CLOSING_REMINDER_HOURS, number][]).sort(([, a], [, b]) => b - a);
  for (const [i, [kind, hours]] of windows.entries()) {
    const until = windows[i + 1]?.[1] ?? 0;
    const tenders = await em.execute<DueTender[]>(
      `select id, reference, title, closes_at, time_zone from tender
        where status = 'open' and published_at is not null and closes_at > ? and closes_at <= ?
          and published_at < closes_at - make_interval(hours => ?)
        order by closes_at`,
      [new Date(now.getTime() + until * HOUR_MS), new Date(now.getTime() + hours * HOUR_MS), hours],
    );
    for (const t of tenders) {
      queued += await em.transactional(async (tx) => {
        const people = await tx.execute<{ id: string; email: string; name: string; organisation: string; has_draft: boolean }[]>(
          `select u.id, u.email, u.name, o.name as organisation,
                  exists (select 1 from bid d where d.tender_id = i.tender_id and d.vendor_organisation_id = o.id and d.status = 'draft') as has_draft
             from invitation i join vendor_organisation o on o.id = i.vendor_organisation_id
             join app_user u on u.vendor_organisation_id = o.id and u.active and u.role = 'vendor' and u.membership = 'approved'
            where i.tender_id = ?
              and not exists (select 1 from bid b where b.tender_id = i.tender_id and b.vendor_organisation_id = o.id and b.status in (${sqlList(LIVE_BID_STATUSES)}))
            order by o.name, u.email`,
          [t.id],
        );
        const byId = new Map(people.map((p) => [p.id, p]));
        const closesAt = formatInZone(new Date(t.closes_at).toISOString(), t.time_zone);
        return notifyOnce(tx, deps.boss, {
          kind, subjectId: t.id, tenderId: t.id, recipients: people,
          render: (r) => {
            const p = byId.get(r.id)!;
            return renderMail('closing-reminder', `Tender ${t.reference} closes within ${hours} hours: your bid is not in`, {
              name: p.name, organisation: p.organisation, reference: t.reference, title: t.title, closesAt, hours, draft: p.has_draft,
              link: `${deps.publicUrl}/tenders/${t.id}`, settingsLink: `${deps.publicUrl}/settings`,
            });
          },
        });
      });
    }
  }
  return queued;
}

/** The buyer is told once that a notified tender's standstill period has ended: its contracts can be recorded. */
export async function sendStandstillEnded(em: EntityManager, deps: NotifyDeps, now = new Date()): Promise<number> {
  const tenders = await em.execute<{ id: string; reference: string; title: string; standstill_ends_at: Date | string; time_zone: string; buyer_id: string; email: string; name: string }[]>(
    `select t.id, t.reference, t.title, t.standstill_ends_at, t.time_zone, u.id as buyer_id, u.email, u.name
       from tender t join app_user u on u.id = t.created_by_id and u.active
      where t.status = 'notified' and t.standstill_ends_at is not null and t.standstill_ends_at <= ?
        and not exists (select 1 from notification_sent n where n.kind = 'standstill-ended' and n.subject_id = t.id)`,
    [now],
  );
  let queued = 0;
  for (const t of tenders) {
    queued += await em.transactional((tx) => notifyOnce(tx, deps.boss, {
      kind: 'standstill-ended', subjectId: t.id, tenderId: t.id, recipients: [{ id: t.buyer_id, email: t.email, name: t.name }],
      render: (r) => renderMail('standstill-ended', `Standstill ended on tender ${t.reference}: record the contracts`, {
        name: r.name, reference: t.reference, title: t.title, endedAt: formatInZone(new Date(t.standstill_ends_at).toISOString(), t.time_zone),
        link: `${deps.publicUrl}/tenders/${t.id}`, settingsLink: `${deps.publicUrl}/settings`,
      }),
    }));
  }
  return queued;
}

/** The reminder job's one pass (server/jobs/queue.ts, every minute beside the close sweep). */
export async function sendDueNotifications(em: EntityManager, deps: NotifyDeps, now = new Date()): Promise<number> {
  return (await sendClosingReminders(em, deps, now)) + (await sendStandstillEnded(em, deps, now));
}
