import { createHash, randomBytes } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import { ROLE_LABELS } from '@shared/auth';
import type { AccountSetupView, InviteUser, PersonView, VendorOrganisationInput, VendorOrganisationView } from '@shared/people';
import { AccountToken, User, VendorOrganisation } from '../entities';
import { ConflictError, NotFoundError, ValidationError } from '../http/errors';
import { enqueueMail } from '../jobs/queue';
import { renderMail } from '../mail/templates';
import { hashPassword } from '../auth/password';
import { escapeLike } from './like';

/** A set-password link is valid this long. */
export const ACCOUNT_LINK_HOURS = 72;

export interface PeopleDeps {
  em: EntityManager;
  boss: PgBoss;
  publicUrl: string;
}

export function personView(user: User, pendingInvitation = false): PersonView {
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    role: user.role,
    active: user.active,
    invitationPending: pendingInvitation,
    vendorOrganisation: user.vendorOrganisation ? { id: user.vendorOrganisation.id, name: user.vendorOrganisation.name } : null,
    createdAt: user.createdAt.toISOString(),
    lastSignInAt: user.lastSignInAt?.toISOString() ?? null,
  };
}

export function organisationView(org: VendorOrganisation): VendorOrganisationView {
  return { id: org.id, name: org.name, registrationNumber: org.registrationNumber, sme: org.sme, contactEmail: org.contactEmail };
}

const sha256 = (token: string) => createHash('sha256').update(token).digest('hex');

export async function listPeople(em: EntityManager): Promise<PersonView[]> {
  const users = await em.find(User, {}, { populate: ['vendorOrganisation', 'passwordHash'], orderBy: { name: 'asc' } });
  return users.map((u) => personView(u, !u.passwordHash));
}

async function findUser(em: EntityManager, id: string): Promise<User> {
  const user = await em.findOne(User, { id }, { populate: ['vendorOrganisation', 'passwordHash'] });
  if (!user) throw new NotFoundError('The person');
  return user;
}

/** Invites a person: creates the account without a password and e-mails a one-time link. */
export async function invitePerson(deps: PeopleDeps, input: InviteUser, invitedBy: User): Promise<PersonView> {
  const { em } = deps;
  const token = await em.transactional(async (tx) => {
    const taken = await tx.count(User, { email: { $ilike: escapeLike(input.email) } });
    if (taken) throw new ConflictError('Someone with this e-mail already has an account.', [{ field: 'email', message: 'This e-mail already has an account.' }]);
    let organisation: VendorOrganisation | null = null;
    if (input.vendorOrganisationId) {
      organisation = await tx.findOne(VendorOrganisation, { id: input.vendorOrganisationId });
      if (!organisation) throw new ValidationError([{ field: 'vendorOrganisationId', message: 'This vendor organisation does not exist.' }]);
    }
    const user = tx.create(User, { email: input.email, name: input.name, role: input.role, vendorOrganisation: organisation });
    return { user, secret: issueToken(tx, user) };
  });
  await sendAccountLink(deps, token.user, token.secret, invitedBy);
  return personView(token.user, true);
}

/** A fresh link for someone who lost or let expire theirs; older links stop working. */
export async function resendInvitation(deps: PeopleDeps, id: string, invitedBy: User): Promise<void> {
  const { em } = deps;
  const user = await findUser(em, id);
  if (!user.active) throw new ConflictError('This account is deactivated. Reactivate it first.');
  const secret = await em.transactional(async (tx) => {
    await tx.nativeUpdate(AccountToken, { user, usedAt: null }, { usedAt: new Date() });
    return issueToken(tx, user);
  });
  await sendAccountLink(deps, user, secret, invitedBy);
}

function issueToken(em: EntityManager, user: User): string {
  const secret = randomBytes(32).toString('base64url');
  em.create(AccountToken, {
    user,
    tokenHash: sha256(secret),
    purpose: 'invitation',
    expiresAt: new Date(Date.now() + ACCOUNT_LINK_HOURS * 3600_000),
  });
  return secret;
}

async function sendAccountLink(deps: PeopleDeps, user: User, secret: string, invitedBy: User): Promise<void> {
  const expiresAt = new Date(Date.now() + ACCOUNT_LINK_HOURS * 3600_000);
  const mail = renderMail('set-password', 'Your Tendara account: set your password', {
    name: user.name,
    invitedBy: invitedBy.name,
    roleLabel: ROLE_LABELS[user.role],
    organisation: user.vendorOrganisation?.name ?? null,
    link: `${deps.publicUrl}/account-setup/${secret}`,
    expiresAt: expiresAt.toISOString().slice(0, 16).replace('T', ' '),
  });
  await enqueueMail(deps.boss, { to: user.email, ...mail });
}

async function liveToken(em: EntityManager, secret: string): Promise<AccountToken> {
  const token = await em.findOne(AccountToken, { tokenHash: sha256(secret) }, { populate: ['user'] });
  if (!token || token.usedAt || token.expiresAt < new Date() || !token.user.active) {
    throw new NotFoundError('This link is used, expired or unknown. Ask your administrator for a new one. The link');
  }
  return token;
}

export async function describeAccountLink(em: EntityManager, secret: string): Promise<AccountSetupView> {
  const token = await liveToken(em, secret);
  return { email: token.user.email, name: token.user.name, expiresAt: token.expiresAt.toISOString() };
}

/** Sets the password and spends the link, in one transaction. */
export async function setPasswordWithLink(em: EntityManager, secret: string, password: string): Promise<void> {
  const hash = await hashPassword(password);
  await em.transactional(async (tx) => {
    const token = await liveToken(tx, secret);
    // Spend the token first and only if still unused: two racing requests cannot both succeed.
    const spent = await tx.nativeUpdate(AccountToken, { id: token.id, usedAt: null }, { usedAt: new Date() });
    if (spent !== 1) throw new NotFoundError('This link is used, expired or unknown. The link');
    await tx.nativeUpdate(User, { id: token.user.id }, { passwordHash: hash });
  });
}

/** Deactivates a person and ends every session they have, at once. */
export async function setActive(em: EntityManager, id: string, active: boolean, actor: User): Promise<PersonView> {
  if (id === actor.id && !active) throw new ConflictError('You cannot deactivate your own account.');
  const user = await findUser(em, id);
  await em.transactional(async (tx) => {
    await tx.nativeUpdate(User, { id }, { active });
    if (!active) await tx.execute(`delete from http_session where sess #>> '{passport,user}' = ?`, [id]);
  });
  user.active = active;
  return personView(user, !user.passwordHash);
}

export async function listOrganisations(em: EntityManager): Promise<VendorOrganisationView[]> {
  const orgs = await em.find(VendorOrganisation, {}, { orderBy: { name: 'asc' } });
  return orgs.map(organisationView);
}

export async function createOrganisation(em: EntityManager, input: VendorOrganisationInput): Promise<VendorOrganisationView> {
  const existing = await em.count(VendorOrganisation, { registrationNumber: input.registrationNumber });
  if (existing) {
    throw new ConflictError('A vendor organisation with this registration number exists.', [
      { field: 'registrationNumber', message: 'This registration number is already registered.' },
    ]);
  }
  const org = em.create(VendorOrganisation, input);
  await em.flush();
  return organisationView(org);
}
