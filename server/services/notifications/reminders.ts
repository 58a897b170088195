import type { EntityManager } from '@mikro-orm/postgresql';
import { CLOSING_REMINDER_HOURS } from '@shared/notifications';
import { formatInZone } from '@shared/time-zone';
import { renderMail } from '../../mail/templates';
import { peopleWithoutLiveBid, standstillEndedUntold, tendersClosingBetween } from '../queries/notifications.queries';
import { notifyOnce, type NotifyDeps } from './notify';

const HOUR_MS = 3_600_000;

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
    const tenders = await tendersClosingBetween(em, new Date(now.getTime() + until * HOUR_MS), new Date(now.getTime() + hours * HOUR_MS), hours);
    for (const t of tenders) {
      queued += await em.transactional(async (tx) => {
        const people = await peopleWithoutLiveBid(tx, t.id);
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
  const tenders = await standstillEndedUntold(em, now);
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
