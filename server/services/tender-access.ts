import type { EntityManager } from '@mikro-orm/postgresql';
import { Invitation, Tender, type User } from '../entities';
import { NotFoundError } from '../http/errors';
import { audit } from './audit.service';

const CLOCK_MARGIN_MS = 60_000;

/**
 * A tender's status as of now, in SQL over `tender t`: an open tender whose closing time has
 * passed is closed, whether or not the close job has written it yet. For reads that must not write.
 */
export const CURRENT_STATUS = `(case when t.status = 'open' and t.closes_at <= now() then 'closed'::tender_status else t.status end)`;

/**
 * Closes the tender if its closing time has passed (server clock, in the database). Atomic and
 * idempotent: the scheduled close job and any read may race it, only one changes the row.
 */
export async function closeIfDue(em: EntityManager, tenderId: string): Promise<boolean> {
  return (await closeWhere(em, 'id = ?', [tenderId])) > 0;
}

/** Closes every open tender whose time has come (run at start-up and by the close job). */
export async function closeAllDue(em: EntityManager): Promise<number> {
  return closeWhere(em, 'true', []);
}

/** Closes the due tenders matching `condition`, each with its audit entry, in one transaction. */
async function closeWhere(em: EntityManager, condition: string, params: unknown[]): Promise<number> {
  // Lists and reads call this on every request: a plain look first (one round trip), the
  // transaction (three at least) only when a tender is due.
  const [due] = await em.execute<{ due: boolean }[]>(
    `select exists (select 1 from tender where ${condition} and status = 'open' and closes_at <= clock_timestamp()) as due`, params,
  );
  if (!due?.due) return 0;
  return em.transactional(async (tx) => {
    const rows = await tx.execute<{ id: string; bids: string }[]>(
      `update tender set status = 'closed', closed_at = closes_at, updated_at = now()
         where ${condition} and status = 'open' and closes_at <= clock_timestamp()
         returning id, (select count(*) from bid where bid.tender_id = tender.id and bid.status in ('submitted', 'revised')) as bids`,
      params,
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
  // Only a tender near its closing time by this server's clock is checked by the database's
  // (the clock that counts): the margin covers any difference between the two.
  if (tender?.status === 'open' && tender.closesAt.getTime() - Date.now() < CLOCK_MARGIN_MS && (await closeIfDue(em, id))) {
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
