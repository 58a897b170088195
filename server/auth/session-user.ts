import type { EntityManager } from '@mikro-orm/core';
import type { Role } from '@shared/roles';
import { User, VendorOrganisation } from '../entities';
import type { SessionUserRow } from './session.queries';

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

/**
 * What a route needs to know of the signed-in person before it touches the ORM — who, which role,
 * which organisation: `req.user`. A User entity has it; so has a SessionPerson.
 */
export interface Principal {
  id: string;
  email: string;
  name: string;
  role: Role;
  vendorOrganisation?: { id: string; name: string } | null;
}

/**
 * The signed-in person as read with the session (session-store.ts), a plain object: the role
 * check and `GET /api/session` need no more, so they build no entity and fork no EntityManager.
 * A route that uses the person as an entity gets one made from the same row (`userEntity`).
 */
export class SessionPerson implements Principal {
  readonly id: string;
  readonly email: string;
  readonly name: string;
  readonly role: Role;
  readonly vendorOrganisation: { id: string; name: string } | null;
  /** The entity made from the row, once per request (a SessionPerson lives as long as its request). */
  private entity?: User;

  constructor(private readonly row: SessionUserRow) {
    this.id = row.id;
    this.email = row.email;
    this.name = row.name;
    this.role = row.role as Role;
    this.vendorOrganisation = row.vendor_organisation ? { id: row.vendor_organisation.id, name: row.vendor_organisation.name } : null;
  }

  /** This person as a User entity of `em` (the request's EntityManager), without a query. */
  toEntity(em: EntityManager): User {
    this.entity ??= signedInUser(em, this.row);
    return this.entity;
  }
}

/** The request's person as a User entity: the one sign-in found, or one made from the session's row. */
export function userEntity(em: EntityManager, person: Principal): User {
  if (person instanceof User) return person;
  if (person instanceof SessionPerson) return person.toEntity(em);
  throw new Error('The signed-in person is neither a User entity nor read with the session.');
}
