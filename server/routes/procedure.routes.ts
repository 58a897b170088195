import type { EntityManager } from '@mikro-orm/postgresql';
import type { Request } from 'express';
import { amendmentInputSchema, answerInputSchema, cancelInputSchema, questionIdParamSchema, questionInputSchema } from '@shared/procedure';
import { tenderIdParamSchema } from '@shared/tenders';
import type { AppDeps } from '../context';
import { arrivedAt } from '../http/arrival';
import { exportName, sendDownload } from '../http/download';
import { route, type AnyRoute } from '../http/route';
import { ocdsPackage } from '../services/ocds/ocds.service';
import * as procedure from '../services/procedure.service';

const OCDS_READERS = ['buyer', 'compliance'] as const;
const OCDS_SUMMARY = 'The procedure as an Open Contracting Data Standard 1.1.5 release package: one release per stage reached (tender, each amendment, opening, award, notices, each contract, or the cancellation). Nothing about the bids before closing; never the estimated value.';

/** Clarifications, amendments and cancellation: the procedure between publication and closing. */
export function procedureRoutes(deps: AppDeps): AnyRoute[] {
  const ctx = (em: EntityManager, req: Request): procedure.ProcedureDeps => ({ em, boss: deps.boss, publicUrl: deps.config.publicUrl, arrivedAt: arrivedAt(req) });
  return [
    route({
      method: 'post', path: '/tenders/:id/questions', tag: 'Procedure', access: ['vendor'], params: tenderIdParamSchema, body: questionInputSchema, status: 201,
      summary: 'An invited vendor asks a clarification question, before the clarification deadline. Only the buyer, compliance and admin see who asked.',
      responses: { 201: 'The question, awaiting an answer', 409: 'The clarification deadline has passed, or the tender is not open' },
      handler: ({ em, user, params, body, req }) => procedure.askQuestion(ctx(em, req), user, params.id, body),
    }),
    route({
      method: 'get', path: '/tenders/:id/questions', tag: 'Procedure', access: ['admin', 'buyer', 'compliance', 'vendor'], params: tenderIdParamSchema,
      summary: 'Clarifications in published order. Vendors: answered ones without the asker, and their own awaiting an answer; buyer, compliance and admin: all, with the asker.',
      handler: ({ em, user, params }) => procedure.listQuestions(em, user, params.id),
    }),
    route({
      method: 'post', path: '/questions/:id/answer', tag: 'Procedure', access: ['buyer'], params: questionIdParamSchema, body: answerInputSchema,
      summary: 'The buyer answers a question once; question and answer are published, numbered, to every invited vendor (without the asker) and e-mailed.',
      responses: { 409: 'Already answered, or the tender is not open' },
      handler: ({ em, user, params, body, req }) => procedure.answerQuestion(ctx(em, req), user, params.id, body),
    }),
    route({
      method: 'post', path: '/tenders/:id/amendments', tag: 'Procedure', access: ['buyer'], params: tenderIdParamSchema, body: amendmentInputSchema, status: 201,
      summary: 'Issue the next numbered amendment of an open tender: extend the closing time, change the description, forecasts or regions (the whole new list). Invited vendors are e-mailed; bids missing an added region return to draft.',
      responses: { 201: '{number}', 400: 'Shortens the closing time, or changes nothing', 409: 'The tender is not open, or its closing time has passed' },
      handler: ({ em, user, params, body, req }) => procedure.issueAmendment(ctx(em, req), user, params.id, body),
    }),
    route({
      method: 'post', path: '/tenders/:id/cancel', tag: 'Procedure', access: ['buyer'], params: tenderIdParamSchema, body: cancelInputSchema,
      summary: 'Cancel a draft or open tender with a reason: invited vendors are told, and its bids are never unsealed.',
      responses: { 409: 'The tender has closed' },
      handler: ({ em, user, params, body, req }) => procedure.cancelTender(ctx(em, req), user, params.id, body),
    }),
    route({
      method: 'get', path: '/tenders/:id/ocds', tag: 'Procedure', access: OCDS_READERS, params: tenderIdParamSchema,
      summary: OCDS_SUMMARY, responses: { 409: 'The tender is a draft: nothing is published yet' },
      handler: async ({ em, user, params }) => (await ocdsPackage(em, user, params.id, deps.config.publicUrl)).content,
    }),
    route({
      method: 'get', path: '/tenders/:id/ocds.json', tag: 'Procedure', access: OCDS_READERS, params: tenderIdParamSchema, produces: 'application/json',
      summary: `${OCDS_SUMMARY} As a file to save.`, responses: { 409: 'The tender is a draft: nothing is published yet' },
      handler: async ({ em, user, params, res }) => {
        const { reference, content } = await ocdsPackage(em, user, params.id, deps.config.publicUrl);
        sendDownload(res, { filename: exportName(reference, 'ocds-release-package.json'), content: `${JSON.stringify(content, null, 2)}\n`, type: 'application/json; charset=utf-8' });
      },
    }),
  ];
}
