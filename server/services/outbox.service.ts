import type { EntityManager } from '@mikro-orm/postgresql';
import type { OutboxMessage, OutboxPage, OutboxQuery, OutboxSummary } from '@shared/people';
import { MailMessage } from '../entities';
import { NotFoundError } from '../http/errors';
import { outboxPageRows } from './queries/outbox.queries';

function summary(m: MailMessage): OutboxSummary {
  return { id: m.id, from: m.fromAddress, to: m.toAddresses, subject: m.subject, date: m.sentAt.toISOString(), hasHtml: !!m.html };
}

/** What stands in an outbox message where a set-password link's secret was. */
export const HIDDEN_LINK = 'link-hidden-in-the-outbox';

/**
 * The secret of every set-password or reset link (`…/account-setup/SECRET`), in text and in HTML
 * (also where HTML encodes the slash), replaced by HIDDEN_LINK: the person it was sent to has it,
 * the administrator reading the catcher does not.
 */
export function maskAccountLinks(body: string): string {
  return body.replace(/(account-setup(?:\/|&#x2F;|&#47;|%2F))[A-Za-z0-9_-]{16,}/gi, `$1${HIDDEN_LINK}`);
}

export interface OutboxOptions {
  /** OUTBOX_SHOW_LINKS: a test or demo installation shows the links; any other masks them. */
  showLinks: boolean;
}

/** One page of the messages whose subject or addresses contain `q` (any case), newest first. */
export async function listOutbox(em: EntityManager, query: OutboxQuery): Promise<OutboxPage> {
  const { ids, total } = await outboxPageRows(em, query.q, query.page, query.pageSize);
  const messages = ids.length ? await em.find(MailMessage, { id: { $in: ids } }) : [];
  const byId = new Map(messages.map((m) => [m.id, m]));
  return {
    messages: ids.map((id) => summary(byId.get(id)!)),
    total,
    page: query.page,
    pageSize: query.pageSize,
  };
}

export async function readOutboxMessage(em: EntityManager, id: string, options: OutboxOptions): Promise<OutboxMessage> {
  const m = await em.findOne(MailMessage, { id });
  if (!m) throw new NotFoundError('The message');
  const shown = (body: string) => (options.showLinks ? body : maskAccountLinks(body));
  return { ...summary(m), text: shown(m.text), html: m.html == null ? null : shown(m.html) };
}
