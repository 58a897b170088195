import {
  idParamSchema, inviteUserSchema, setPasswordSchema, tokenParamSchema, vendorOrganisationSchema,
} from '@shared/people';
import type { AppDeps } from '../context';
import { route, type AnyRoute } from '../http/route';
import { auditTrail, verifyTrail } from '../services/audit.service';
import * as people from '../services/people.service';

export function peopleRoutes(deps: AppDeps): AnyRoute[] {
  const ctx = (em: import('@mikro-orm/postgresql').EntityManager) => ({ em, boss: deps.boss, publicUrl: deps.config.publicUrl });
  return [
    route({
      method: 'get', path: '/users', tag: 'People', access: ['admin'],
      summary: 'Everyone with an account, with role, organisation, membership and status.',
      handler: ({ em }) => people.listPeople(em),
    }),
    route({
      method: 'post', path: '/users', tag: 'People', access: ['admin'], body: inviteUserSchema, status: 201,
      summary: 'Invite a person: creates the account and e-mails a one-time set-password link (valid 72 h). A person added to a vendor organisation that already has people waits for its contact\'s approval (membership `pending`, no link until then).',
      responses: { 201: 'The new person', 409: 'The e-mail already has an account' },
      handler: ({ em, body, user }) => people.invitePerson(ctx(em), body, user),
    }),
    route({
      method: 'post', path: '/users/:id/deactivate', tag: 'People', access: ['admin'], params: idParamSchema,
      summary: 'Deactivate a person: they can no longer sign in and their sessions end at once.',
      handler: ({ em, params, user }) => people.setActive(em, params.id, false, user),
    }),
    route({
      method: 'post', path: '/users/:id/reactivate', tag: 'People', access: ['admin'], params: idParamSchema,
      summary: 'Reactivate a person.',
      handler: ({ em, params, user }) => people.setActive(em, params.id, true, user),
    }),
    route({
      method: 'post', path: '/users/:id/invitation', tag: 'People', access: ['admin'], params: idParamSchema, status: 202,
      summary: 'Send a fresh set-password link to a person who never set a password; earlier links stop working. 409 for an account with a password (send a reset).',
      responses: { 202: 'Queued', 409: 'The person has a password, is deactivated or awaits approval' },
      handler: async ({ em, params, user }) => {
        await people.resendInvitation(ctx(em), params.id, user);
        return { queued: true };
      },
    }),
    route({
      method: 'post', path: '/users/:id/password-reset', tag: 'People', access: ['admin'], params: idParamSchema, status: 202,
      summary: 'E-mail the person, at their own address, a one-time link to choose a new password; using it ends all their sessions.',
      responses: { 202: 'Queued', 409: 'The person has no password yet or is deactivated' },
      handler: async ({ em, params, user }) => {
        await people.sendPasswordReset(ctx(em), params.id, user);
        return { queued: true };
      },
    }),
    route({
      method: 'get', path: '/admin/audit', tag: 'People', access: ['admin'],
      summary: 'The admin audit trail: invitations, memberships, links, resets, (de)activations and organisations, chained by hash.',
      handler: ({ em }) => auditTrail(em, null),
    }),
    route({
      method: 'get', path: '/admin/audit/verify', tag: 'People', access: ['admin'],
      summary: 'Recomputes the admin audit trail\'s hash chain.',
      handler: ({ em }) => verifyTrail(em, null),
    }),
    route({
      method: 'get', path: '/vendor-organisations', tag: 'People', access: ['admin', 'buyer'],
      summary: 'Vendor organisations (firms that can be invited to tenders).',
      handler: ({ em }) => people.listOrganisations(em),
    }),
    route({
      method: 'post', path: '/vendor-organisations', tag: 'People', access: ['admin'], body: vendorOrganisationSchema, status: 201,
      summary: 'Register a vendor organisation.',
      responses: { 201: 'The organisation', 409: 'The registration number is already registered' },
      handler: ({ em, body, user }) => people.createOrganisation(em, body, user),
    }),
    route({
      method: 'get', path: '/organisation/members', tag: 'People', access: ['vendor'],
      summary: 'The people of your own vendor organisation, and whether you are the contact who approves new ones.',
      handler: ({ em, user }) => people.listMembers(em, user),
    }),
    route({
      method: 'post', path: '/organisation/members/:id/approve', tag: 'People', access: ['vendor'], params: idParamSchema,
      summary: 'The organisation\'s contact approves a person an administrator asked to add; the person then gets their set-password link.',
      responses: { 200: 'The organisation\'s people', 403: 'You are not the contact', 409: 'Already decided' },
      handler: ({ em, params, user }) => people.decideMembership(ctx(em), user, params.id, true),
    }),
    route({
      method: 'post', path: '/organisation/members/:id/refuse', tag: 'People', access: ['vendor'], params: idParamSchema,
      summary: 'The organisation\'s contact refuses a person an administrator asked to add; the account stays unusable.',
      responses: { 200: 'The organisation\'s people', 403: 'You are not the contact', 409: 'Already decided' },
      handler: ({ em, params, user }) => people.decideMembership(ctx(em), user, params.id, false),
    }),
    route({
      method: 'get', path: '/account-setup/:token', tag: 'Account', access: 'public', params: tokenParamSchema,
      summary: 'Whom a set-password link is for, and whether it is a first password or a reset (404 when used, expired or unknown).',
      handler: ({ em, params }) => people.describeAccountLink(em, params.token),
    }),
    route({
      method: 'post', path: '/account-setup/:token', tag: 'Account', access: 'public', params: tokenParamSchema,
      body: setPasswordSchema, status: 204,
      summary: 'Set a password with a one-time link (at least 12 characters, not only spaces, not a common password). The link is spent and every session of the person ends.',
      responses: { 204: 'Password set', 400: 'The password is too short, blank or common (field `password`)', 404: 'Used, expired or unknown link' },
      handler: ({ em, params, body }) => people.setPasswordWithLink(em, params.token, body.password),
    }),
  ];
}
