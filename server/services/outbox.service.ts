import type { EntityManager } from '@mikro-orm/postgresql';
import type { OutboxMessage, OutboxSummary } from '@shared/people';
import { MailMessage } from '../entities';
import { NotFoundError } from '../http/errors';

function summary(m: MailMessage): OutboxSummary {
  return { id: m.id, from: m.fromAddress, to: m.toAddresses, subject: m.subject, date: m.sentAt.toISOString(), hasHtml: !!m.html };
}

/** Newest first, at most `limit`. */
export async function listOutbox(em: EntityManager, limit = 500): Promise<OutboxSummary[]> {
  const messages = await em.find(MailMessage, {}, { orderBy: { sentAt: 'desc', createdAt: 'desc' }, limit });
  return messages.map(summary);
}

export async function readOutboxMessage(em: EntityManager, id: string): Promise<OutboxMessage> {
  const m = await em.findOne(MailMessage, { id });
  if (!m) throw new NotFoundError('The message');
  return { ...summary(m), text: m.text, html: m.html ?? null };
}
