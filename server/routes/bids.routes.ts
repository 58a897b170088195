import { z } from 'zod';
import { abnormallyLowInputSchema, bidIdParamsSchema, complianceInputSchema, validityExtensionInputSchema } from '@shared/compliance';
import { bidSaveSchema, tenderIdParamSchema } from '@shared/tenders';
import { UPLOAD_MAX_BYTES, type AppDeps } from '../context';
import { rowReadWithSession } from '../auth/session-read';
import { arrivedAt } from '../http/arrival';
import { XSRF_HEADER } from '../http/xsrf';
import { ValidationError } from '../http/errors';
import { route, type AnyRoute } from '../http/route';
import * as bids from '../services/bids.service';
import * as compliance from '../services/compliance.service';
import * as opening from '../services/opening-record.service';
import { cleanDocumentContent } from '../services/bid-documents';
import { sendDownload, XLSX } from '../http/download';


export function bidRoutes(deps: AppDeps): AnyRoute[] {
  // `em` stays a getter: the save and the withdrawal run on the plain pg pool and fork no EntityManager unless they need one.
  const ctx = (input: { em: import('@mikro-orm/postgresql').EntityManager; req: import('express').Request }): bids.BidDeps => ({
    get em() {
      return input.em;
    },
    pool: deps.sessionPool, boss: deps.boss, publicUrl: deps.config.publicUrl, arrivedAt: arrivedAt(input.req), hooks: deps.bidHooks,
  });
  return [
    route({
      method: 'get', path: '/tenders/:id/bids', tag: 'Bids', access: ['buyer', 'compliance'], params: tenderIdParamSchema,
      summary: 'Before closing only {submitted: n}; after closing also every submitted bid (the bid tabulation), each with its receipt commitment (digest), the nonce that keys it and receiptVerified.',
      handler: ({ em, user, params }) => bids.bidsOf(em, user, params.id),
    }),
    route({
      method: 'get', path: '/tenders/:id/tabulation.xlsx', tag: 'Bids', access: ['buyer', 'compliance'], params: tenderIdParamSchema, produces: XLSX,
      summary: 'The bid tabulation as a workbook (after closing only).',
      responses: { 409: 'Bids are sealed until closing' },
      handler: async ({ em, user, params, res }) => {
        const file = await bids.tabulationWorkbook(em, user, params.id);
        sendDownload(res, { ...file, type: XLSX });
      },
    }),
    route({
      method: 'get', path: '/tenders/:id/documents/:documentId', tag: 'Bids', access: ['buyer', 'compliance'],
      params: z.object({ id: z.uuid({ error: 'Must be a valid id.' }), documentId: z.uuid({ error: 'Must be a valid id.' }) }), produces: XLSX,
      summary: 'A workbook a vendor uploaded with its bid (after closing only), as a values-only copy: no formulas, links, names or macros. The original is kept as the record.',
      handler: async ({ em, user, params, res }) => {
        const doc = await bids.bidDocument(em, user, params.id, params.documentId);
        sendDownload(res, { filename: doc.filename, content: await cleanDocumentContent(doc), type: XLSX });
      },
    }),
    route({
      method: 'get', path: '/tenders/:id/opening-record', tag: 'Bids', access: ['buyer', 'compliance', 'admin'], params: tenderIdParamSchema,
      summary: 'The opening record made when the tender closed: every bid received (vendor, time received, revision, receipt) and every bid withdrawn, with the SHA-256 of its canonical JSON (the tender.closed audit entry carries it). None before closing, nor for a tender closed before opening records were kept (404).',
      handler: ({ em, user, params }) => opening.openingRecordOf(em, user, params.id),
    }),
    route({
      method: 'get', path: '/tenders/:id/opening-record.xlsx', tag: 'Bids', access: ['buyer', 'compliance', 'admin'], params: tenderIdParamSchema, produces: XLSX,
      summary: 'The opening record as a workbook.',
      handler: async ({ em, user, params, res }) => {
        const file = await opening.openingRecordWorkbook(em, user, params.id);
        sendDownload(res, { ...file, type: XLSX });
      },
    }),
    route({
      method: 'put', path: '/tenders/:id/bids/:bidId/compliance', tag: 'Bids', access: ['buyer'], params: bidIdParamsSchema, body: complianceInputSchema,
      summary: 'The compliance check of one bid after closing: compliant, or excluded with a ground from the fixed list and a note. An excluded bid is out of every scenario; its vendor gets an exclusion notice. Returns the bid as tabulated.',
      responses: { 409: 'Not closed, already awarded, or a recommendation awaits compliance' },
      handler: ({ em, user, params, body }) => compliance.decideCompliance(em, user, params.id, params.bidId, body),
    }),
    route({
      method: 'put', path: '/tenders/:id/bids/:bidId/abnormally-low', tag: 'Bids', access: ['buyer'], params: bidIdParamsSchema, body: abnormallyLowInputSchema,
      summary: 'For a bid flagged as abnormally low: when an explanation was asked for, whether it was accepted, and why. A run awarding a flagged line is recommended only once it is accepted.',
      responses: { 409: 'Not closed, already awarded, the bid is not flagged or is excluded' },
      handler: ({ em, user, params, body }) => compliance.decideAbnormallyLow(em, user, params.id, params.bidId, body),
    }),
    route({
      method: 'post', path: '/tenders/:id/bid/validity-extension', tag: 'Bids', access: ['vendor'], params: tenderIdParamSchema, body: validityExtensionInputSchema,
      summary: "The vendor confirms that its bid stays valid until `until` (absent: one more validity period). After closing, before the award is approved; an award past the bids' validity is approved only with each awarded vendor's extension.",
      responses: { 409: 'Not closed, or already awarded' },
      handler: ({ em, user, params, body }) => compliance.extendValidity(em, user, params.id, body),
    }),
    route({
      method: 'get', path: '/tenders/:id/bid', tag: 'Bids', access: ['vendor'], params: tenderIdParamSchema,
      summary: "The vendor's own bid on the tender, or null.",
      handler: async ({ em, user, params }) => ({ bid: await bids.ownBid(em, user, params.id) }),
    }),
    route({
      method: 'put', path: '/tenders/:id/bid', tag: 'Bids', access: ['vendor'], params: tenderIdParamSchema, body: bidSaveSchema,
      summary: 'Save a draft (submit: false) or submit/revise (submit: true) before closing: a request whose body arrived in full before the closing time is accepted and stamped with that time. Send the version you loaded (null for a first save).',
      responses: { 409: 'Closed, or changed elsewhere since loaded' },
      // A draft is saved in the statement that reads the session (one round trip; not with the test hooks).
      writesWithSession: ({ params, body, req }, sid) => (deps.bidHooks ? undefined : bids.draftWithSession(sid, params.id, body, arrivedAt(req), req.get(XSRF_HEADER))),
      // The person as read with the session (no User entity): the save is SQL of its own.
      handler: (input) => bids.saveBid(ctx(input), input.req.user!, input.params.id, input.body, rowReadWithSession(input.req)),
    }),
    route({
      method: 'post', path: '/tenders/:id/bid/withdraw', tag: 'Bids', access: ['vendor'], params: tenderIdParamSchema,
      body: z.object({ version: z.number({ error: 'Version is required.' }).int().min(1) }),
      summary: 'Withdraw the bid before closing.',
      handler: (input) => bids.withdrawBid(ctx(input), input.req.user!, input.params.id, input.body.version),
    }),
    route({
      method: 'get', path: '/tenders/:id/bid-workbook', tag: 'Bids', access: ['vendor'], params: tenderIdParamSchema, produces: XLSX,
      summary: 'The bid workbook for this tender, with the figures saved so far.',
      handler: async ({ em, user, params, res }) => {
        const file = await bids.vendorWorkbook(em, user, params.id);
        sendDownload(res, { ...file, type: XLSX });
      },
    }),
    route({
      method: 'post', path: '/tenders/:id/bid-workbook', tag: 'Bids', access: ['vendor'], params: tenderIdParamSchema,
      upload: { field: 'file', maxBytes: UPLOAD_MAX_BYTES },
      summary: 'Upload a filled-in bid workbook (.xlsx, at most 5 MB): returns its figures for review, or every problem by sheet and cell. Nothing is submitted.',
      handler: async ({ em, user, params, req }) => {
        if (!req.file) throw new ValidationError([{ field: 'file', message: 'Choose the bid workbook (.xlsx) to upload.' }]);
        return bids.uploadWorkbook(em, user, params.id, req.file, arrivedAt(req));
      },
    }),
  ];
}
