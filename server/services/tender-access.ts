import type { EntityManager } from '@mikro-orm/postgresql';
import { Invitation, Tender, type User } from '../entities';
import { NotFoundError } from '../http/errors';
import { audit } from './audit.service';

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
  if (await closeIfDue(em, id)) em.clear();
  const tender = await em.findOne(Tender, { id }, { populate: ['regions'] });
  if (!tender) throw new NotFoundError('The tender');
  if (user.role === 'vendor') {
    const invited = tender.status !== 'draft' && user.vendorOrganisation
      ? await em.count(Invitation, { tender, vendorOrganisation: user.vendorOrganisation })
      : 0;
    if (!invited) throw new NotFoundError('The tender');
  }
  return tender;
}
