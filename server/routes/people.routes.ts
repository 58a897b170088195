import {
  idParamSchema, inviteUserSchema, setPasswordSchema, tokenParamSchema, vendorOrganisationSchema,
} from '@shared/people';
import type { AppDeps } from '../context';
import { route, type AnyRoute } from '../http/route';
import * as people from '../services/people.service';

export function peopleRoutes(deps: AppDeps): AnyRoute[] {
  const ctx = (em: import('@mikro-orm/postgresql').EntityManager) => ({ em, boss: deps.boss, publicUrl: deps.config.publicUrl });
  return [
    route({
      method: 'get', path: '/users', tag: 'People', access: ['admin'],
      summary: 'Everyone with an account, with role, organisation and status.',
      handler: ({ em }) => people.listPeople(em),
    }),
    route({
      method: 'post', path: '/users', tag: 'People', access: ['admin'], body: inviteUserSchema, status: 201,
      summary: 'Invite a person: creates the account and e-mails a one-time set-password link (valid 72 h).',
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
      summary: 'Send a fresh set-password link; earlier links stop working.',
      handler: async ({ em, params, user }) => {
        await people.resendInvitation(ctx(em), params.id, user);
        return { queued: true };
      },
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
      handler: ({ em, body }) => people.createOrganisation(em, body),
    }),
    route({
      method: 'get', path: '/account-setup/:token', tag: 'Account', access: 'public', params: tokenParamSchema,
      summary: 'Whom a set-password link is for (404 when used, expired or unknown).',
      handler: ({ em, params }) => people.describeAccountLink(em, params.token),
    }),
    route({
      method: 'post', path: '/account-setup/:token', tag: 'Account', access: 'public', params: tokenParamSchema,
      body: setPasswordSchema, status: 204,
      summary: 'Set a password with a one-time link (at least 12 characters). The link is spent.',
      handler: ({ em, params, body }) => people.setPasswordWithLink(em, params.token, body.password),
    }),
  ];
}

