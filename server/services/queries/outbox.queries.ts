import type { EntityManager } from '@mikro-orm/postgresql';
import { escapeLike } from '../like';

/** One page of the Outbox: the ids of the messages shown, newest first, and how many match in all. */
export interface OutboxPageRows {
  ids: string[];
  total: number;
}

/** The messages whose subject or addresses contain `q` (any case; every message without one). */
export async function outboxPageRows(em: EntityManager, q: string | undefined, page: number, pageSize: number): Promise<OutboxPageRows> {
  const where = q
    ? `where m.subject ilike ? or m.from_address ilike ? or array_to_string(m.to_addresses, ' ') ilike ?`
    : '';
  const params = q ? Array<string>(3).fill(`%${escapeLike(q)}%`) : [];
  const [counted] = await em.execute<{ total: string }[]>(`select count(*) as total from mail_message m ${where}`, params);
  const ids = await em.execute<{ id: string }[]>(
    `select m.id from mail_message m ${where} order by m.sent_at desc, m.created_at desc, m.id limit ? offset ?`,
    [...params, pageSize, (page - 1) * pageSize],
  );
  return { ids: ids.map((r) => r.id), total: Number(counted?.total ?? 0) };
}
