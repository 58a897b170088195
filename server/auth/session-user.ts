import type { EntityManager } from '@mikro-orm/core';
import type { Role } from '@shared/roles';
import { User, VendorOrganisation } from '../entities';
import type { SessionUserRow } from './session-store';

/**
 * The rows come from the database, so there is nothing to validate, and the organisation is merged
 * first, so there is nothing to cascade to: both steps cost time on every signed-in request.
 */
const MERGE = { validate: false, cascade: false } as const;

/**
 * The signed-in person as this request's User entity, made from the row the session store read
 * with the session (see session-store.ts) without another query: merged into the request's
 * EntityManager, as a `findOne` would have left it, so services can use it as a reference.
 */
export function signedInUser(em: EntityManager, row: SessionUserRow): User {
  const o = row.vendor_organisation;
  const organisation = o
    ? em.merge(VendorOrganisation, {
      id: o.id, createdAt: new Date(o.created_at), updatedAt: new Date(o.updated_at),
      name: o.name, registrationNumber: o.registration_number, sme: o.sme, contactEmail: o.contact_email,
    }, MERGE)
    : null;
  return em.merge(User, {
    id: row.id, createdAt: new Date(row.created_at), updatedAt: new Date(row.updated_at),
    email: row.email, name: row.name, role: row.role as Role, active: row.active, membership: row.membership,
    lastSignInAt: row.last_sign_in_at ? new Date(row.last_sign_in_at) : null, vendorOrganisation: organisation,
  }, MERGE);
}
