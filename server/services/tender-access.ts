import type { EntityManager } from '@mikro-orm/postgresql';
import type { TenderStatus } from '@shared/tenders';
import { Invitation, Tender, type User } from '../entities';
import { ConflictError, NotFoundError } from '../http/errors';
import { audit } from './audit.service';
import { writeOpeningRecord } from './opening';
import { lockDueTenders, lockTenderRow, markTendersClosed, openTenderDue } from './queries/tender-rows.queries';

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
  return (await closeDue(em, tenderId, now)) > 0;
}

/** Closes every open tender whose time has come (run at start-up and by the close job). */
export async function closeAllDue(em: EntityManager, now = new Date()): Promise<number> {
  return closeDue(em, null, now);
}

/**
 * Closes the due tender (or, with null, every due tender), each with its opening record and its audit entry
 * (which carries the record's digest), in one transaction. The
 * rows are locked first: a bid being stored holds its tender's row FOR SHARE, so closing waits for
 * every bid in flight; the bids are counted by a later statement, which (read committed) sees them.
 */
async function closeDue(em: EntityManager, tenderId: string | null, now: Date): Promise<number> {
  const cutoff = new Date(now.getTime() - CLOSING_GRACE_MS);
  // Lists and reads call this on every request: a plain look first (one round trip), the
  // transaction (three at least) only when a tender is due.
  if (!(await openTenderDue(em, tenderId, cutoff))) return 0;
  return em.transactional(async (tx) => {
    const locked = await lockDueTenders(tx, tenderId, cutoff);
    if (!locked.length) return 0;
    const rows = await markTendersClosed(tx, locked);
    for (const row of rows) {
      // The opening record (and the first abnormally-low screen) in the same transaction: its
      // digest is in the closing entry, so the record cannot change unseen afterwards.
      const opening = await writeOpeningRecord(tx, row.id, new Date());
      await audit(tx, {
        tenderId: row.id, actor: null, action: 'tender.closed', subject: 'tender',
        detail: { submittedBids: Number(row.bids), ...opening }, before: { status: 'open' }, after: { status: 'closed' },
      });
    }
    return rows.length;
  });
}

/**
 * Who may see which tender, the one rule every service applies:
 * - a buyer sees, edits and evaluates only the tenders it created (`tender.createdBy`);
 * - compliance and admin oversee every tender;
 * - a vendor sees only published tenders its organisation was invited to.
 * Anything else is "not found" (404, never 403), so that nobody learns which tenders exist.
 *
 * For lists: the buyer whose tenders `user` may see (its own id), or null when the role is not
 * limited to its own tenders (vendors are limited by invitation instead).
 */
export function tenderOwnerScope(user: Pick<User, 'id' | 'role'>): string | null {
  return user.role === 'buyer' ? user.id : null;
}

/** Whether `user` may see a tender created by `createdById`, leaving aside the vendor rule. */
function ownsOrOversees(user: User, createdById: string): boolean {
  const owner = tenderOwnerScope(user);
  return owner === null || owner === createdById;
}

/**
 * The tender as `user` may see it, closed first if due. A vendor sees only published tenders it was
 * invited to; a buyer only its own (see `tenderOwnerScope`); anything else is "not found", so that
 * nobody learns which tenders exist.
 */
export async function findVisibleTender(em: EntityManager, user: User, id: string): Promise<Tender> {
  let tender = await em.findOne(Tender, { id }, { populate: ['regions'] });
  if (tender && !ownsOrOversees(user, tender.createdBy.id)) tender = null;
  if (tender?.status === 'open' && tender.closesAt.getTime() + CLOSING_GRACE_MS <= Date.now() && (await closeIfDue(em, id))) {
    em.clear();
    tender = await em.findOne(Tender, { id }, { populate: ['regions'] });
  }
  if (!tender) throw new NotFoundError('The tender');
  if (user.role === 'vendor') {
    // Published ones only: a draft cancelled before publication was never shown to its vendors.
    const invited = tender.status !== 'draft' && tender.publishedAt && user.vendorOrganisation
      ? await em.count(Invitation, { tender, vendorOrganisation: user.vendorOrganisation })
      : 0;
    if (!invited) throw new NotFoundError('The tender');
  }
  return tender;
}

/**
 * The guard of every decision on a tender, first statement of the decision's transaction: locks the
 * tender row, checks that `user` may act on it (the same rule as `findVisibleTender`: 404 otherwise)
 * and that its status is one of `allowed` (409 with `conflict` otherwise). Two decisions on one
 * tender therefore run one after the other, and the second sees what the first committed: it gets
 * 409 instead of contradicting it.
 *
 * `FOR NO KEY UPDATE`, not `FOR UPDATE`: rows that only reference the tender (runs, audit entries)
 * take a key-share lock on it, which `FOR UPDATE` would block — a finishing solve holding the audit
 * chain's lock would then deadlock with a decision holding the tender.
 */
export async function lockTender(
  tx: EntityManager, user: User, tenderId: string, allowed: readonly TenderStatus[], conflict: string,
): Promise<{ id: string; status: TenderStatus }> {
  const row = await lockTenderRow(tx, tenderId);
  // Vendors decide nothing on a tender (their bids take a lock of their own, in bids.service).
  if (!row || user.role === 'vendor' || !ownsOrOversees(user, row.created_by_id)) throw new NotFoundError('The tender');
  if (!allowed.includes(row.status)) throw new ConflictError(conflict);
  return { id: tenderId, status: row.status };
}
