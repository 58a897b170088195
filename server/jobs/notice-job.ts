import type { MikroORM } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import { Notice } from '../entities';
import { logger } from '../logger';
import type { Mailer } from '../mail/mailer';
import { notifiedIfAllSent } from '../services/notices/notices.service';
import { noticeRetryLimit, noticeRetrySeconds, queueNotice, QUEUES } from './queue';

/**
 * Sends one notice. A sent notice is never sent again. While the mail server is unreachable the
 * notice stays queued, with the error and the count of attempts, and a fresh job is queued behind
 * the others (a retried job would keep its place at the front and starve the rest), until the
 * retry limit marks it failed.
 */
export async function sendNotice(orm: MikroORM, boss: PgBoss, mailer: Mailer, noticeId: string): Promise<void> {
  const em = orm.em.fork();
  const notice = await em.findOne(Notice, { id: noticeId });
  if (!notice || notice.status !== 'queued') return;
  const attempts = notice.attempts + 1;
  try {
    await mailer.send({ to: notice.toAddresses.join(', '), subject: notice.subject, text: notice.text, html: notice.html });
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    const giveUp = attempts >= noticeRetryLimit();
    await em.nativeUpdate(Notice, { id: noticeId, status: 'queued' }, { attempts, lastError: message.slice(0, 500), status: giveUp ? 'failed' : 'queued' });
    logger.warn({ noticeId, err: message, attempts, giveUp }, 'notice not sent');
    if (!giveUp) await queueNotice(boss, noticeId, noticeRetrySeconds());
    return;
  }
  await em.nativeUpdate(Notice, { id: noticeId }, { status: 'sent', sentAt: new Date(), attempts, lastError: null });
  await notifiedIfAllSent(em, notice.tender.id);
}

export async function startNoticeWorker(boss: PgBoss, orm: MikroORM, mailer: Mailer): Promise<void> {
  await boss.work<{ noticeId: string }>(QUEUES.notice, { batchSize: 1, pollingIntervalSeconds: 1 }, async (jobs) => {
    for (const job of jobs) await sendNotice(orm, boss, mailer, job.data.noticeId);
  });
}
