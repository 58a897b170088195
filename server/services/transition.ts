import type { EntityData, EntityManager, EntityName, FilterQuery } from '@mikro-orm/postgresql';
import type { BaseEntity } from '../entities/base.entity';
import { ConflictError } from '../http/errors';

/**
 * A guarded state change: moves row `id` of `entity` from one of the states `from` to the values in
 * `changes` with one conditional UPDATE (`… where id = ? and status in (…)`), inside the caller's
 * transaction. When no row changed, another decision moved it first: 409 with `conflict`, and the
 * caller's transaction (its audit entry included) rolls back, so nothing of the losing decision is
 * stored. Decisions on a tender also hold the tender's lock (`lockTender`), so they queue behind each
 * other; this is the check that the row itself is still where the decision found it.
 */
export async function transition<T extends BaseEntity>(
  tx: EntityManager, entity: EntityName<T>, id: string, from: readonly string[], changes: EntityData<T>, conflict: string,
): Promise<void> {
  const changed = await tx.nativeUpdate(entity, { id, status: { $in: from } } as FilterQuery<T>, { ...changes, updatedAt: new Date() });
  if (changed !== 1) throw new ConflictError(conflict);
}
