import type { MikroORM } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import { Notice } from '../entities';
import { logger } from '../logger';
import type { Mailer } from '../mail/mailer';
import { notifiedIfAllSent } from '../services/notices/notices.service';
import { claimQueuedNotice } from '../services/queries/notices.queries';
import { noticeRetryLimit, noticeRetrySeconds, queueNotice, QUEUES } from './queue';

/**
 * Sends one notice. A sent notice is never sent again: the notice row is locked (FOR UPDATE SKIP
 * LOCKED) while its mail goes out and marked sent in the same transaction, so a second job for the
 * same notice (a retry racing a slow send) finds it locked or sent and leaves it. While the mail
 * server is unreachable the notice stays queued, with the error and the count of attempts, and a
 * fresh job is queued behind the others (a retried job would keep its place at the front and starve
 * the rest), until the retry limit marks it failed.
 */
export async function sendNotice(orm: MikroORM, boss: PgBoss, mailer: Mailer, noticeId: string): Promise<void> {
  const em = orm.em.fork();
  const outcome = await em.transactional(async (tx) => {
    const notice = await claimQueuedNotice(tx, noticeId);
    if (!notice) return null;
    const attempts = notice.attempts + 1;
    try {
      await mailer.send({ to: notice.to_addresses.join(', '), subject: notice.subject, text: notice.text, html: notice.html });
    } catch (err) {
      const message = err instanceof Error ? err.message : String(err);
      const giveUp = attempts >= noticeRetryLimit();
      await tx.nativeUpdate(Notice, { id: noticeId }, { attempts, lastError: message.slice(0, 500), status: giveUp ? 'failed' : 'queued', updatedAt: new Date() });
      logger.warn({ noticeId, err: message, attempts, giveUp }, 'notice not sent');
      return { sent: false, retry: !giveUp, tenderId: notice.tender_id };
    }
    await tx.nativeUpdate(Notice, { id: noticeId }, { status: 'sent', sentAt: new Date(), attempts, lastError: null, updatedAt: new Date() });
    return { sent: true, retry: false, tenderId: notice.tender_id };
  });
  if (!outcome) return;
  if (outcome.retry) await queueNotice(boss, noticeId, noticeRetrySeconds());
  if (outcome.sent) await notifiedIfAllSent(em, outcome.tenderId);
}

export async function startNoticeWorker(boss: PgBoss, orm: MikroORM, mailer: Mailer): Promise<void> {
  await boss.work<{ noticeId: string }>(QUEUES.notice, { batchSize: 1, pollingIntervalSeconds: 1 }, async (jobs) => {
    for (const job of jobs) await sendNotice(orm, boss, mailer, job.data.noticeId);
  });
}
