import type { EntityManager } from '@mikro-orm/postgresql';
import { Invitation, Tender, type User } from '../entities';
import { NotFoundError } from '../http/errors';
import { audit } from './audit.service';

/**
 * How long after its closing time a tender is closed and its bids opened. A bid is on time when its
 * request arrived in full before the closing time (http/arrival.ts); it is stored by a transaction
 * that may start a little later (sign-in lookup, a database connection, the tender row's lock).
 * Until the grace has passed the tender stays open for those bids only — every request that
 * arrived at or after the closing time is refused — so that closing counts them and nobody sees a
 * tabulation that a bid still in flight would change. It also covers a difference between the
 * clocks of the machines that serve requests and run the closing job.
 */
export const CLOSING_GRACE_MS = 30_000;

/**
 * Closes the tender if its closing time plus the grace has passed by `now` (this process's clock,
 * the one arrival stamps are taken by; the database's is never used for it). Atomic and
 * idempotent: the scheduled close job and any read may race it, only one changes the row.
 */
export async function closeIfDue(em: EntityManager, tenderId: string, now = new Date()): Promise<boolean> {
  return (await closeWhere(em, 'id = ?', [tenderId], now)) > 0;
}

/** Closes every open tender whose time has come (run at start-up and by the close job). */
export async function closeAllDue(em: EntityManager, now = new Date()): Promise<number> {
  return closeWhere(em, 'true', [], now);
}

/**
 * Closes the due tenders matching `condition`, each with its audit entry, in one transaction. The
 * rows are locked first: a bid being stored holds its tender's row FOR SHARE, so closing waits for
 * every bid in flight; the bids are counted by a later statement, which (read committed) sees them.
 */
async function closeWhere(em: EntityManager, condition: string, params: unknown[], now: Date): Promise<number> {
  const cutoff = new Date(now.getTime() - CLOSING_GRACE_MS);
  // Lists and reads call this on every request: a plain look first (one round trip), the
  // transaction (three at least) only when a tender is due.
  const [due] = await em.execute<{ due: boolean }[]>(
    `select exists (select 1 from tender where ${condition} and status = 'open' and closes_at <= ?) as due`, [...params, cutoff],
  );
  if (!due?.due) return 0;
  return em.transactional(async (tx) => {
    const locked = await tx.execute<{ id: string }[]>(
      // NO KEY UPDATE, as the update itself: it waits for bids (FOR SHARE) but not for audit
      // entries being appended (their foreign key takes KEY SHARE), which may hold the chain's lock.
      `select id from tender where ${condition} and status = 'open' and closes_at <= ? order by id for no key update`, [...params, cutoff],
    );
    if (!locked.length) return 0;
    const rows = await tx.execute<{ id: string; bids: string }[]>(
      `update tender set status = 'closed', closed_at = closes_at, updated_at = now()
         where id = any(?::uuid[])
         returning id, (select count(*) from bid where bid.tender_id = tender.id and bid.status in ('submitted', 'revised')) as bids`,
      [`{${locked.map((r) => r.id).join(',')}}`],
    );
    for (const row of rows) {
      await audit(tx, {
        tenderId: row.id, actor: null, action: 'tender.closed', subject: 'tender',
        detail: { submittedBids: Number(row.bids) }, before: { status: 'open' }, after: { status: 'closed' },
      });
    }
    return rows.length;
  });
}

/**
 * The tender as `user` may see it, closed first if due. A vendor sees only published tenders it was
 * invited to; anything else is "not found", so that vendors cannot learn which tenders exist.
 */
export async function findVisibleTender(em: EntityManager, user: User, id: string): Promise<Tender> {
  let tender = await em.findOne(Tender, { id }, { populate: ['regions'] });
  if (tender?.status === 'open' && tender.closesAt.getTime() + CLOSING_GRACE_MS <= Date.now() && (await closeIfDue(em, id))) {
    em.clear();
    tender = await em.findOne(Tender, { id }, { populate: ['regions'] });
  }
  if (!tender) throw new NotFoundError('The tender');
  if (user.role === 'vendor') {
    const invited = tender.status !== 'draft' && user.vendorOrganisation
      ? await em.count(Invitation, { tender, vendorOrganisation: user.vendorOrganisation })
      : 0;
    if (!invited) throw new NotFoundError('The tender');
  }
  return tender;
}
