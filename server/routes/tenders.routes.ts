import { z } from 'zod';
import { closureDaysInputSchema, invitationInputSchema, tenderIdParamSchema, tenderInputSchema, tenderListQuerySchema, tenderPageSchema } from '@shared/tenders';
import { UPLOAD_MAX_BYTES, type AppDeps } from '../context';
import { ValidationError } from '../http/errors';
import { route, type AnyRoute } from '../http/route';
import { rowReadWithSession } from '../auth/session-read';
import * as tenders from '../services/tenders.service';
import { parseRegionFileOffThread } from '../workbooks/workbook-pool';

export function tenderRoutes(deps: AppDeps): AnyRoute[] {
  const ctx = (em: import('@mikro-orm/postgresql').EntityManager) => ({ em, boss: deps.boss, publicUrl: deps.config.publicUrl });
  return [
    route({
      method: 'get', path: '/tenders', tag: 'Tenders', access: ['admin', 'buyer', 'compliance', 'vendor'], query: tenderListQuerySchema,
      response: tenderPageSchema,
      summary: 'One page of the tenders (newest closing first unless sorted otherwise) with how many match in all; filter by status, search reference/title/commodity. A vendor sees only published tenders it is invited to.',
      // A vendor's page is read in the statement that reads the session; the person as read with
      // the session: the list forks no EntityManager and builds no entity.
      readsWithSession: (query, sid) => tenders.vendorListReadWithSession(query, sid),
      handler: ({ req, query }) => tenders.listTenders(deps.sessionPool, req.user!, query, rowReadWithSession(req)),
    }),
    route({
      method: 'post', path: '/tenders', tag: 'Tenders', access: ['buyer'], body: tenderInputSchema, status: 201,
      summary: 'Create a draft tender with its regions.',
      responses: { 201: 'The draft', 409: 'The reference is already used' },
      handler: ({ em, user, body }) => tenders.createTender(em, user, body),
    }),
    route({
      method: 'get', path: '/tenders/:id', tag: 'Tenders', access: ['admin', 'buyer', 'compliance', 'vendor'], params: tenderIdParamSchema,
      summary: 'One tender with its regions; for buyer, compliance and admin also the invitations and the count of submitted bids (never their content before closing).',
      handler: ({ em, user, params }) => tenders.tenderView(em, user, params.id),
    }),
    route({
      method: 'put', path: '/tenders/:id', tag: 'Tenders', access: ['buyer'], params: tenderIdParamSchema, body: tenderInputSchema,
      summary: 'Edit a draft tender (its regions are replaced).',
      responses: { 409: 'The tender is published' },
      handler: ({ em, user, params, body }) => tenders.updateTender(em, user, params.id, body),
    }),
    route({
      method: 'put', path: '/tenders/:id/closure-days', tag: 'Tenders', access: ['buyer'], params: tenderIdParamSchema, body: closureDaysInputSchema,
      summary: "Set the buying body's closure days (a standstill never ends on one), until compliance approves the award and its standstill end is fixed.",
      responses: { 409: 'The award is approved: the standstill end is fixed' },
      handler: ({ em, user, params, body }) => tenders.setClosureDays(em, user, params.id, body.closureDays),
    }),
    route({
      method: 'post', path: '/tenders/regions/import', tag: 'Tenders', access: ['buyer'], upload: { field: 'file', maxBytes: UPLOAD_MAX_BYTES },
      summary: 'Read regions from an .xlsx or .csv file (header row code, name, forecast) for the tender editor; nothing is stored.',
      handler: async ({ req }) => {
        if (!req.file) throw new ValidationError([{ field: 'file', message: 'Choose an .xlsx or .csv file.' }]);
        const result = await parseRegionFileOffThread(req.file.buffer, { filename: req.file.originalname, mimeType: req.file.mimetype });
        if (!result.ok) {
          throw new ValidationError(result.errors.map((e) => ({ field: e.row === null ? 'file' : `row ${e.row}`, message: e.message })), 'The file has problems.');
        }
        return { regions: result.regions };
      },
    }),
    route({
      method: 'post', path: '/tenders/:id/invitations', tag: 'Tenders', access: ['buyer'], params: tenderIdParamSchema, body: invitationInputSchema,
      summary: 'Invite vendor organisations, or a new vendor contact (who gets an account link). Vendors of an open tender are e-mailed at once.',
      handler: ({ em, user, params, body }) => tenders.inviteVendors(ctx(em), user, params.id, body),
    }),
    route({
      method: 'delete', path: '/tenders/:id/invitations/:organisationId', tag: 'Tenders', access: ['buyer'],
      params: z.object({ id: z.uuid({ error: 'Must be a valid id.' }), organisationId: z.uuid({ error: 'Must be a valid id.' }) }),
      summary: 'Withdraw an invitation (drafts only).',
      handler: ({ em, user, params }) => tenders.removeInvitation(em, user, params.id, params.organisationId),
    }),
    route({
      method: 'post', path: '/tenders/:id/publish', tag: 'Tenders', access: ['buyer'], params: tenderIdParamSchema,
      summary: 'Publish a draft: bidding opens, every invited vendor is e-mailed, closing is scheduled.',
      responses: { 400: 'Not ready (names what is missing)', 409: 'Already published' },
      handler: ({ em, user, params }) => tenders.publishTender(ctx(em), user, params.id),
    }),
  ];
}
