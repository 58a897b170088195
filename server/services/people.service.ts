import { createHash, randomBytes } from 'node:crypto';
import { LockMode } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import { ROLE_LABELS } from '@shared/roles';
import { DEFAULT_TIME_ZONE } from '@shared/time-zone';
import type {
  AccountSetupView, InviteUser, MemberView, PersonView, VendorOrganisationInput, VendorOrganisationView,
} from '@shared/people';
import { AccountToken, User, VendorOrganisation } from '../entities';
import { ConflictError, ForbiddenError, NotFoundError, ValidationError } from '../http/errors';
import { enqueueMail } from '../jobs/queue';
import type { OutgoingMail } from '../mail/mailer';
import { renderMail } from '../mail/templates';
import { hashPassword } from '../auth/password';
import { refuseCommonPassword } from '../auth/common-passwords';
import { audit } from './audit.service';
import { deleteSessionsOf } from './queries/people.queries';

/** A set-password link is valid this long. */
export const ACCOUNT_LINK_HOURS = 72;

export interface PeopleDeps {
  em: EntityManager;
  boss: PgBoss;
  publicUrl: string;
}

/**
 * E-mails a change wants sent. They are prepared inside its transaction and queued only after it
 * committed (`sendAfterCommit`), so a refused change sends nothing.
 */
export type MailOut = OutgoingMail;

export function personView(user: User, pendingInvitation = false): PersonView {
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    role: user.role,
    active: user.active,
    invitationPending: pendingInvitation,
    membership: user.membership,
    vendorOrganisation: user.vendorOrganisation ? { id: user.vendorOrganisation.id, name: user.vendorOrganisation.name } : null,
    createdAt: user.createdAt.toISOString(),
    lastSignInAt: user.lastSignInAt?.toISOString() ?? null,
  };
}

export function organisationView(org: VendorOrganisation): VendorOrganisationView {
  return { id: org.id, name: org.name, registrationNumber: org.registrationNumber, sme: org.sme, contactEmail: org.contactEmail };
}

const sha256 = (token: string) => createHash('sha256').update(token).digest('hex');
/** What the admin audit trail records of a person (no secrets). */
const personDetail = (user: User) => ({
  person: user.id, email: user.email, name: user.name, role: user.role,
  vendorOrganisation: user.vendorOrganisation ? { id: user.vendorOrganisation.id, name: user.vendorOrganisation.name } : null,
});

/** Queues the prepared e-mails; call only once the transaction that made them has committed. */
export async function sendAfterCommit(boss: PgBoss, mails: readonly MailOut[]): Promise<void> {
  for (const mail of mails) await enqueueMail(boss, mail);
}

export async function listPeople(em: EntityManager): Promise<PersonView[]> {
  const users = await em.find(User, {}, { populate: ['vendorOrganisation', 'passwordHash'], orderBy: { name: 'asc' } });
  return users.map((u) => personView(u, !u.passwordHash));
}

async function findUser(em: EntityManager, id: string, lock = false): Promise<User> {
  const user = await em.findOne(User, { id }, {
    populate: ['vendorOrganisation', 'passwordHash'],
    ...(lock ? { lockMode: LockMode.PESSIMISTIC_WRITE, lockTableAliases: ['u0'] } : {}),
  });
  if (!user) throw new NotFoundError('The person');
  return user;
}

/**
 * The contact of a vendor organisation, who decides who joins it: its active account at the
 * organisation's contact e-mail, or else its oldest active account with a password.
 */
export async function organisationContact(em: EntityManager, org: VendorOrganisation): Promise<User | null> {
  const people = await em.find(
    User,
    { vendorOrganisation: org, active: true, membership: 'approved', passwordHash: { $ne: null } },
    { orderBy: { createdAt: 'asc', id: 'asc' } },
  );
  return people.find((p) => p.email === org.contactEmail) ?? people[0] ?? null;
}

/**
 * Creates a person inside the caller's transaction. Staff and the first account of a vendor
 * organisation get a set-password link at once. A person added to a vendor organisation that
 * already has people is `pending` until the organisation's contact approves: no link exists, they
 * cannot sign in, and the contact is asked (so no administrator can put someone into a firm to read
 * its bids). Every invitation is in the admin audit trail.
 */
export async function addPerson(
  tx: EntityManager, deps: Pick<PeopleDeps, 'publicUrl'>, input: InviteUser, invitedBy: User,
): Promise<{ user: User; mails: MailOut[] }> {
  if (await tx.count(User, { email: input.email })) {
    throw new ConflictError('Someone with this e-mail already has an account.', [{ field: 'email', message: 'This e-mail already has an account.' }]);
  }
  let organisation: VendorOrganisation | null = null;
  let contact: User | null = null;
  if (input.vendorOrganisationId) {
    // Locked, so two invitations into an empty organisation cannot both become its first account.
    organisation = await tx.findOne(VendorOrganisation, { id: input.vendorOrganisationId }, { lockMode: LockMode.PESSIMISTIC_WRITE });
    if (!organisation) throw new ValidationError([{ field: 'vendorOrganisationId', message: 'This vendor organisation does not exist.' }]);
    if (await tx.count(User, { vendorOrganisation: organisation })) {
      contact = await organisationContact(tx, organisation);
      if (!contact) {
        throw new ConflictError('This vendor organisation has no active contact who could approve a new person. Reactivate its contact first.', [
          { field: 'vendorOrganisationId', message: 'No active contact can approve a new person for this organisation.' },
        ]);
      }
    }
  }
  const user = tx.create(User, {
    email: input.email, name: input.name, role: input.role, vendorOrganisation: organisation,
    membership: contact ? 'pending' : 'approved',
  });
  await tx.flush();
  const mails: MailOut[] = [];
  if (contact && organisation) {
    mails.push({
      to: contact.email,
      ...renderMail('membership-request', `Approve a new person for ${organisation.name}?`, {
        name: contact.name, requestedBy: invitedBy.name, personName: user.name, personEmail: user.email,
        organisation: organisation.name, link: `${deps.publicUrl}/organisation`,
      }),
    });
    await audit(tx, { tenderId: null, actor: invitedBy, action: 'membership.requested', subject: 'person', detail: { ...personDetail(user), contact: contact.id } });
  } else {
    mails.push(accountLinkMail(deps, user, issueToken(tx, user, 'invitation'), invitedBy.name, 'invitation'));
    await audit(tx, { tenderId: null, actor: invitedBy, action: 'person.invited', subject: 'person', detail: personDetail(user) });
  }
  await tx.flush();
  return { user, mails };
}

/** Invites a person: the account, its audit entry and its e-mail commit together or not at all. */
export async function invitePerson(deps: PeopleDeps, input: InviteUser, invitedBy: User): Promise<PersonView> {
  const { user, mails } = await deps.em.transactional((tx) => addPerson(tx, deps, input, invitedBy));
  await sendAfterCommit(deps.boss, mails);
  return personView(user, true);
}

/**
 * A fresh link for someone who never set a password (lost or expired link); older links stop
 * working. An account with a password gets a password reset instead, sent to its own address.
 */
export async function resendInvitation(deps: PeopleDeps, id: string, invitedBy: User): Promise<void> {
  const mail = await deps.em.transactional(async (tx) => {
    const user = await findUser(tx, id, true);
    if (!user.active) throw new ConflictError('This account is deactivated. Reactivate it first.');
    if (user.membership !== 'approved') throw new ConflictError('This person awaits the approval of their organisation\'s contact: no link can be sent before it.');
    if (user.passwordHash) throw new ConflictError('This person has set a password already. Send a password reset instead: it goes to their own address.');
    await tx.nativeUpdate(AccountToken, { user, usedAt: null }, { usedAt: new Date() });
    const secret = issueToken(tx, user, 'invitation');
    await tx.flush();
    await audit(tx, { tenderId: null, actor: invitedBy, action: 'invitation.resent', subject: 'person', detail: personDetail(user) });
    return accountLinkMail(deps, user, secret, invitedBy.name, 'invitation');
  });
  await sendAfterCommit(deps.boss, [mail]);
}

/**
 * A password reset for an account that has a password: a one-time link e-mailed to the person's
 * own address (never shown to the administrator); using it ends every session of theirs.
 */
export async function sendPasswordReset(deps: PeopleDeps, id: string, requestedBy: User): Promise<void> {
  const mail = await deps.em.transactional(async (tx) => {
    const user = await findUser(tx, id, true);
    if (!user.active) throw new ConflictError('This account is deactivated. Reactivate it first.');
    if (!user.passwordHash) throw new ConflictError('This person has not set a password yet. Send a fresh invitation link instead.');
    await tx.nativeUpdate(AccountToken, { user, usedAt: null }, { usedAt: new Date() });
    const secret = issueToken(tx, user, 'reset');
    await tx.flush();
    await audit(tx, { tenderId: null, actor: requestedBy, action: 'password.reset-sent', subject: 'person', detail: personDetail(user) });
    return accountLinkMail(deps, user, secret, requestedBy.name, 'reset');
  });
  await sendAfterCommit(deps.boss, [mail]);
}

function issueToken(em: EntityManager, user: User, purpose: AccountToken['purpose']): string {
  const secret = randomBytes(32).toString('base64url');
  em.create(AccountToken, {
    user,
    tokenHash: sha256(secret),
    purpose,
    expiresAt: new Date(Date.now() + ACCOUNT_LINK_HOURS * 3600_000),
  });
  return secret;
}

function accountLinkMail(deps: Pick<PeopleDeps, 'publicUrl'>, user: User, secret: string, sentBy: string, purpose: AccountToken['purpose']): MailOut {
  const expiresAt = new Date(Date.now() + ACCOUNT_LINK_HOURS * 3600_000);
  const timeZone = DEFAULT_TIME_ZONE;
  const link = `${deps.publicUrl}/account-setup/${secret}`;
  const mail = purpose === 'reset'
    ? renderMail('password-reset', 'Your Tendara account: choose a new password', { name: user.name, email: user.email, requestedBy: sentBy, link, expiresAt, timeZone })
    : renderMail('set-password', 'Your Tendara account: set your password', {
      name: user.name,
      invitedBy: sentBy,
      roleLabel: ROLE_LABELS[user.role],
      organisation: user.vendorOrganisation?.name ?? null,
      link,
      expiresAt,
      timeZone,
    });
  return { to: user.email, ...mail };
}

async function liveToken(em: EntityManager, secret: string): Promise<AccountToken> {
  const token = await em.findOne(AccountToken, { tokenHash: sha256(secret) }, { populate: ['user'] });
  if (!token || token.usedAt || token.expiresAt < new Date() || !token.user.active || token.user.membership !== 'approved') {
    throw new NotFoundError('This link is used, expired or unknown. Ask your administrator for a new one. The link');
  }
  return token;
}

export async function describeAccountLink(em: EntityManager, secret: string): Promise<AccountSetupView> {
  const token = await liveToken(em, secret);
  return { email: token.user.email, name: token.user.name, expiresAt: token.expiresAt.toISOString(), purpose: token.purpose };
}

/**
 * Sets the password and spends the link, in one transaction, and ends every session the person
 * has (a reset is how a stolen session is taken back). Common passwords are refused.
 */
export async function setPasswordWithLink(em: EntityManager, secret: string, password: string): Promise<void> {
  refuseCommonPassword(password);
  const hash = await hashPassword(password);
  await em.transactional(async (tx) => {
    const token = await liveToken(tx, secret);
    // Spend the token first and only if still unused: two racing requests cannot both succeed.
    const spent = await tx.nativeUpdate(AccountToken, { id: token.id, usedAt: null }, { usedAt: new Date() });
    if (spent !== 1) throw new NotFoundError('This link is used, expired or unknown. The link');
    await tx.nativeUpdate(User, { id: token.user.id }, { passwordHash: hash });
    const ended = await deleteSessionsOf(tx, token.user.id);
    await audit(tx, {
      tenderId: null, actor: token.user, action: token.purpose === 'reset' ? 'password.reset' : 'password.set', subject: 'person',
      detail: { person: token.user.id, email: token.user.email, sessionsEnded: ended },
    });
  });
}


/** Deactivates a person and ends every session they have, at once; or reactivates them. */
export async function setActive(em: EntityManager, id: string, active: boolean, actor: User): Promise<PersonView> {
  if (id === actor.id && !active) throw new ConflictError('You cannot deactivate your own account.');
  const user = await em.transactional(async (tx) => {
    const u = await findUser(tx, id, true);
    if (active && u.membership === 'refused') {
      throw new ConflictError('The organisation\'s contact refused this person, so the account stays closed.');
    }
    await tx.nativeUpdate(User, { id }, { active });
    if (!active) await deleteSessionsOf(tx, id);
    await audit(tx, { tenderId: null, actor, action: active ? 'person.reactivated' : 'person.deactivated', subject: 'person', detail: personDetail(u) });
    u.active = active;
    return u;
  });
  return personView(user, !user.passwordHash);
}

export async function listOrganisations(em: EntityManager): Promise<VendorOrganisationView[]> {
  const orgs = await em.find(VendorOrganisation, {}, { orderBy: { name: 'asc' } });
  return orgs.map(organisationView);
}

/** Registers an organisation inside the caller's transaction (with its admin audit entry). */
export async function registerOrganisation(tx: EntityManager, input: VendorOrganisationInput, actor: User): Promise<VendorOrganisation> {
  const existing = await tx.count(VendorOrganisation, { registrationNumber: input.registrationNumber });
  if (existing) {
    throw new ConflictError('A vendor organisation with this registration number exists.', [
      { field: 'registrationNumber', message: 'This registration number is already registered.' },
    ]);
  }
  const org = tx.create(VendorOrganisation, input);
  await tx.flush();
  await audit(tx, { tenderId: null, actor, action: 'organisation.registered', subject: 'vendor organisation', detail: { organisation: org.id, ...input } });
  return org;
}

export async function createOrganisation(em: EntityManager, input: VendorOrganisationInput, actor: User): Promise<VendorOrganisationView> {
  return organisationView(await em.transactional((tx) => registerOrganisation(tx, input, actor)));
}

/** The people of the vendor's own organisation, and who may decide on new ones. */
export async function listMembers(em: EntityManager, vendor: User): Promise<MemberView> {
  const org = vendor.vendorOrganisation;
  if (!org) throw new ForbiddenError();
  const organisation = await em.findOneOrFail(VendorOrganisation, { id: org.id });
  const contact = await organisationContact(em, organisation);
  const people = await em.find(User, { vendorOrganisation: organisation }, { orderBy: { createdAt: 'asc' } });
  return {
    organisation: { id: organisation.id, name: organisation.name },
    youAreContact: contact?.id === vendor.id,
    contactName: contact?.name ?? null,
    people: people.map((p) => ({ id: p.id, name: p.name, email: p.email, membership: p.membership, active: p.active, createdAt: p.createdAt.toISOString() })),
  };
}

/**
 * The organisation's contact approves or refuses a person an administrator asked to add. Approval
 * sends the person their set-password link; refusal leaves the account unusable. Under a row lock,
 * so two decisions on one request cannot both win.
 */
export async function decideMembership(deps: PeopleDeps, vendor: User, id: string, approve: boolean): Promise<MemberView> {
  const mails = await deps.em.transactional(async (tx) => {
    const person = await findUser(tx, id, true);
    if (!vendor.vendorOrganisation || person.vendorOrganisation?.id !== vendor.vendorOrganisation.id) throw new NotFoundError('The person');
    const contact = await organisationContact(tx, person.vendorOrganisation);
    if (contact?.id !== vendor.id) throw new ForbiddenError('Only your organisation\'s contact decides who joins it.');
    if (person.membership !== 'pending') throw new ConflictError(`This request was already ${person.membership === 'approved' ? 'approved' : 'refused'}.`);
    person.membership = approve ? 'approved' : 'refused';
    if (!approve) person.active = false;
    await tx.flush();
    await audit(tx, { tenderId: null, actor: vendor, action: approve ? 'membership.approved' : 'membership.refused', subject: 'person', detail: personDetail(person) });
    if (!approve) return [];
    const secret = issueToken(tx, person, 'invitation');
    await tx.flush();
    return [accountLinkMail(deps, person, secret, vendor.name, 'invitation')];
  });
  await sendAfterCommit(deps.boss, mails);
  return listMembers(deps.em.fork(), vendor);
}
