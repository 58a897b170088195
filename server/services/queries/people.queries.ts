import type { EntityManager } from '@mikro-orm/postgresql';

/**
 * Deletes every stored session of a person (connect-pg-simple keeps passport's user id in the
 * session's JSON), so they are signed out on their next request; returns how many there were.
 */
export async function deleteSessionsOf(em: EntityManager, userId: string): Promise<number> {
  const rows = await em.execute<{ sid: string }[]>(`delete from http_session where sess #>> '{passport,user}' = ? returning sid`, [userId]);
  return rows.length;
}
