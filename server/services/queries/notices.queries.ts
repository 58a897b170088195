import type { EntityManager } from '@mikro-orm/postgresql';

/** A queued notice as the send job reads it. */
export interface QueuedNoticeRow {
  tender_id: string;
  attempts: number;
  to_addresses: string[];
  subject: string;
  text: string;
  html: string;
}

/** How many of the tender's notices are not sent yet (queued or failed). */
export async function unsentNoticeCount(em: EntityManager, tenderId: string): Promise<number> {
  const [row] = await em.execute<{ open: string }[]>(`select count(*) as open from notice where tender_id = ? and status <> 'sent'`, [tenderId]);
  return Number(row?.open ?? 0);
}

/**
 * Locks a queued notice for sending until the caller's transaction ends; null when it is sent,
 * failed, or being sent by another job right now (FOR UPDATE SKIP LOCKED).
 */
export async function claimQueuedNotice(tx: EntityManager, noticeId: string): Promise<QueuedNoticeRow | null> {
  const [row] = await tx.execute<QueuedNoticeRow[]>(
    `select tender_id, attempts, to_addresses, subject, text, html from notice where id = ? and status = 'queued' for update skip locked`, [noticeId],
  );
  return row ?? null;
}
