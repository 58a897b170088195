import { z } from 'zod';
import { compareQuerySchema, decisionInputSchema, recommendationInputSchema, returnInputSchema, scenarioInputSchema, sensitivityInputSchema } from '@shared/evaluation';
import { debriefViewSchema, explanationViewSchema } from '@shared/explanation';
import { tenderIdParamSchema } from '@shared/tenders';
import type { AppDeps } from '../context';
import { route, type AnyRoute } from '../http/route';
import { auditCsv, auditTrail, verifyTrail } from '../services/audit.service';
import { markSeen } from '../services/worklist.service';
import { currentRecommendation, decide, recommend } from '../services/evaluation/recommendation.service';
import { explanationOf, startDebrief, startExplanation, startRegionCheck } from '../services/evaluation/explanation.service';
import { compareRuns, findRun, resilienceOf, runView, startResilience } from '../services/evaluation/results.service';
import { findVisibleTender } from '../services/tender-access';
import { sensitivityOf, startSensitivity } from '../services/evaluation/sensitivity.service';
import { cancelRun, createScenario, listRuns, listScenarios, queueRun, updateScenario } from '../services/evaluation/scenarios.service';
import { buildAwardWorkbook } from '../workbooks/award-workbook';
import { CSV, exportName, sendDownload, XLSX } from '../http/download';

const id = z.object({ id: z.uuid({ error: 'Must be a valid id.' }) });
const runVendor = id.extend({ vendorId: z.uuid({ error: 'Must be a valid vendor id.' }) });
const runRegion = id.extend({ region: z.string().min(1, { error: 'Must be a region code.' }).max(64, { error: 'Must be a region code of at most 64 characters.' }) });
const EVALUATORS = ['buyer', 'compliance'] as const;

export function evaluationRoutes(deps: AppDeps): AnyRoute[] {
  const ctx = (em: import('@mikro-orm/postgresql').EntityManager) => ({ em, boss: deps.boss });
  const notify = { boss: deps.boss, publicUrl: deps.config.publicUrl };
  return [
    route({
      method: 'get', path: '/tenders/:id/scenarios', tag: 'Evaluation', access: EVALUATORS, params: tenderIdParamSchema,
      summary: 'Scenarios of a closed tender with their latest run (the built-in all-split and all-sole ones included).',
      handler: ({ em, user, params }) => listScenarios(em, user, params.id),
    }),
    route({
      method: 'post', path: '/tenders/:id/scenarios', tag: 'Evaluation', access: ['buyer'], params: tenderIdParamSchema, body: scenarioInputSchema, status: 201,
      summary: 'Create a scenario: a name and the award rules (vendor ids = organisation ids, region ids = region codes).',
      handler: ({ em, user, params, body }) => createScenario(ctx(em), user, params.id, body),
    }),
    route({
      method: 'put', path: '/scenarios/:id', tag: 'Evaluation', access: ['buyer'], params: id, body: scenarioInputSchema,
      summary: "Change a scenario's name, rules or time limit (not the built-in ones; not once awarded).",
      handler: ({ em, user, params, body }) => updateScenario(ctx(em), user, params.id, body),
    }),
    route({
      method: 'post', path: '/scenarios/:id/runs', tag: 'Evaluation', access: ['buyer'], params: id, status: 202,
      summary: 'Queue a solve of the scenario over the submitted bids; poll GET /api/runs/:id. Idempotent: while a run of the same scenario over the same input (bids, rules, time limit) is queued, solving or solved, that run is answered with 200 instead of a new one.',
      responses: { 200: 'The run of the same input that already exists', 202: 'A new run, queued', 409: 'The tender is awarded (or not yet closed)' },
      handler: async ({ em, user, params, res }) => {
        const { run, created } = await queueRun(ctx(em), user, params.id);
        res.status(created ? 202 : 200).json({ id: run.id, status: run.status });
      },
    }),
    route({
      method: 'get', path: '/tenders/:id/runs', tag: 'Evaluation', access: EVALUATORS, params: tenderIdParamSchema,
      summary: 'Runs of the tender, newest first (resilience re-solves left out).',
      handler: ({ em, user, params }) => listRuns(em, user, params.id),
    }),
    route({
      method: 'get', path: '/runs/:id', tag: 'Evaluation', access: EVALUATORS, params: id,
      summary: "A run: status, timings, the input digest and the engine's result (vendor = organisation id, region = region code).",
      handler: ({ em, user, params }) => runView(em, user, params.id),
    }),
    route({
      method: 'post', path: '/runs/:id/cancel', tag: 'Evaluation', access: ['buyer'], params: id,
      summary: 'Cancel a queued or solving run.',
      handler: ({ em, user, params }) => cancelRun(em, user, params.id),
    }),
    route({
      method: 'get', path: '/runs/:id/export.xlsx', tag: 'Evaluation', access: EVALUATORS, params: id, produces: XLSX,
      summary: "The run's award as a workbook.",
      handler: async ({ em, user, params, res }) => {
        const run = await findRun(em, user, params.id);
        const file = await buildAwardWorkbook(await runView(em, user, params.id), run.tender);
        sendDownload(res, { filename: exportName(run.tender.reference, `award-${run.id.slice(0, 8)}.xlsx`), content: file, type: XLSX });
      },
    }),
    route({
      method: 'get', path: '/tenders/:id/compare', tag: 'Evaluation', access: EVALUATORS, params: tenderIdParamSchema, query: compareQuerySchema,
      summary: 'Runs side by side against the plain split baseline, and the cost of sole award.',
      handler: ({ em, user, params, query }) => compareRuns(em, user, params.id, query.runs),
    }),
    route({
      method: 'post', path: '/runs/:id/resilience', tag: 'Evaluation', access: EVALUATORS, params: id, status: 202,
      summary: 'Re-solve the award without each awarded vendor in turn (queued runs). Idempotent: a vendor whose re-solve is queued, solving or solved gets none again; when none is new the answer is 200 {queued: 0}.',
      responses: { 200: 'Every re-solve already exists: nothing queued', 202: 'The missing re-solves, queued', 409: 'The tender is awarded, or the run has no award' },
      handler: async ({ em, user, params, res }) => {
        const answer = await startResilience(ctx(em), user, params.id);
        res.status(answer.queued ? 202 : 200).json(answer);
      },
    }),
    route({
      method: 'get', path: '/runs/:id/resilience', tag: 'Evaluation', access: EVALUATORS, params: id,
      summary: 'The cost (or infeasibility) of the award if each awarded vendor dropped out, re-solved on the run\'s own problem (its rules and exclusions kept); a vendor the rules require is listed as such (`required`), never re-solved nor the worst case; the worst case marked.',
      handler: ({ em, user, params }) => resilienceOf(em, user, params.id),
    }),
    route({
      method: 'post', path: '/runs/:id/explanation', tag: 'Evaluation', access: EVALUATORS, params: id, status: 202, response: explanationViewSchema,
      summary: "Explain the run's award, region by region: one forced re-solve per region, within 6 × the run's solve time (a region not proven in its share keeps a range; ask for it exactly with POST /runs/{id}/explanation/regions/{region}) (on the solve queue; poll GET). Idempotent: one per run; a failed one is queued again. Debriefs are asked for per vendor (POST /runs/{id}/debrief/{vendorId}).",
      responses: { 200: 'The explanation already exists (queued, running or done): nothing queued', 202: 'Queued', 409: 'The run has no award' },
      handler: async ({ em, user, params, res }) => {
        const { view, queued } = await startExplanation(ctx(em), user, params.id);
        res.status(queued ? 202 : 200).json(view);
      },
    }),
    route({
      method: 'get', path: '/runs/:id/explanation', tag: 'Evaluation', access: EVALUATORS, params: id, response: explanationViewSchema,
      summary: 'Why each region went where it did (the cheapest bid not awarded there, the reason and the extra cost of forcing it, exact or as a range), and the debriefs asked for so far (`debriefs`): the unit price per region and the uniform cut each vendor would have needed. Buyer and compliance only.',
      handler: ({ em, user, params }) => explanationOf(em, user, params.id),
    }),
    route({
      method: 'post', path: '/runs/:id/explanation/regions/:region', tag: 'Evaluation', access: EVALUATORS, params: runRegion, status: 202, response: explanationViewSchema,
      summary: "Work one region of a done explanation out exactly: the forced re-solve of its cheapest unawarded bid, given the run's whole time limit (on the solve queue; the figures then replace the region's in GET /runs/{id}/explanation, listed in `regionChecks`). Cached per run and region; a failed one is queued again.",
      responses: { 200: 'This region is already queued, being worked out or done: nothing queued', 202: 'Queued', 404: 'No such run, or no compliant bid lost this region', 409: 'The explanation is not done yet' },
      handler: async ({ em, user, params, res }) => {
        const { view, queued } = await startRegionCheck(ctx(em), user, params.id, params.region);
        res.status(queued ? 202 : 200).json(view);
      },
    }),
    route({
      method: 'post', path: '/runs/:id/debrief/:vendorId', tag: 'Evaluation', access: EVALUATORS, params: runVendor, status: 202, response: debriefViewSchema,
      summary: "Work out one vendor's debrief of the run: the unit price at which it would have been awarded each region it bid and did not win, and (no award) the uniform cut of all its prices that would have won it one (re-solves on the solve queue; the result appears in GET /runs/{id}/explanation `debriefs`). Cached per run and vendor; a failed one is queued again. Never for vendors.",
      responses: { 200: 'This debrief already exists (queued, running or done): nothing queued', 202: 'Queued', 404: 'No such run, or the vendor has no compliant bid in it', 409: 'The run has no award' },
      handler: async ({ em, user, params, res }) => {
        const { view, queued } = await startDebrief(ctx(em), user, params.id, params.vendorId);
        res.status(queued ? 202 : 200).json(view);
      },
    }),
    route({
      method: 'post', path: '/runs/:id/sensitivity', tag: 'Evaluation', access: EVALUATORS, params: id, body: sensitivityInputSchema, status: 202,
      summary: "Re-solve the run's own problem (bids, rules, exclusions) with every forecast, or one region's alone (`regionCode`), at −20 %, −10 %, +10 % and +20 % (queued runs; forecasts rounded to the award increment when there is one). Cached: a case already queued, solving or solved is not solved again; when none is new the answer is 200 {queued: 0}.",
      responses: { 200: 'Every case already exists: nothing queued', 202: 'The missing cases, queued', 409: 'The tender is awarded, or the run has no award, or it is itself a re-solve' },
      handler: async ({ em, user, params, body, res }) => {
        const answer = await startSensitivity(ctx(em), user, params.id, body);
        res.status(answer.queued ? 202 : 200).json(answer);
      },
    }),
    route({
      method: 'get', path: '/runs/:id/sensitivity', tag: 'Evaluation', access: EVALUATORS, params: id,
      summary: 'Forecast sensitivity of the run: for each tested change (all regions, and each region checked alone) the total, the number of vendors awarded, whether the same vendors win the same regions and the changes in words; and per check the range of changes in which the award stays the same ({runId, objective, vendorsAwarded, steps, awardIncrement, all, regions}).',
      handler: ({ em, user, params }) => sensitivityOf(em, user, params.id),
    }),
    route({
      method: 'get', path: '/tenders/:id/recommendation', tag: 'Evaluation', access: EVALUATORS, params: tenderIdParamSchema,
      summary: 'The latest recommendation and its state.',
      handler: ({ em, user, params }) => currentRecommendation(em, user, params.id),
    }),
    route({
      method: 'post', path: '/tenders/:id/recommendation', tag: 'Evaluation', access: ['buyer'], params: tenderIdParamSchema, body: recommendationInputSchema, status: 201,
      summary: "Recommend a run's award, with a justification.",
      handler: ({ em, user, params, body }) => recommend(em, user, params.id, body, notify),
    }),
    route({
      method: 'post', path: '/tenders/:id/recommendation/approve', tag: 'Evaluation', access: ['compliance'], params: tenderIdParamSchema, body: decisionInputSchema,
      summary: 'Approve the recommendation (never the person who made it): the tender becomes awarded; scenarios and bids freeze.',
      handler: ({ em, user, params, body }) => decide(em, user, params.id, 'approved', body.comment, notify),
    }),
    route({
      method: 'post', path: '/tenders/:id/recommendation/return', tag: 'Evaluation', access: ['compliance'], params: tenderIdParamSchema, body: returnInputSchema,
      summary: 'Return the recommendation to the buyer with a comment.',
      handler: ({ em, user, params, body }) => decide(em, user, params.id, 'returned', body.comment, notify),
    }),
    route({
      method: 'get', path: '/tenders/:id/audit', tag: 'Audit', access: EVALUATORS, params: tenderIdParamSchema,
      summary: 'The audit trail of the tender: every state change and decision, chained by hash.',
      handler: async ({ em, user, params }) => {
        await findVisibleTender(em, user, params.id);
        return auditTrail(em, params.id);
      },
    }),
    route({
      method: 'get', path: '/tenders/:id/audit/verify', tag: 'Audit', access: EVALUATORS, params: tenderIdParamSchema,
      summary: 'Recompute every hash of the chain and say whether it is intact.',
      handler: async ({ em, user, params }) => {
        await findVisibleTender(em, user, params.id);
        const at = new Date();
        const verification = await verifyTrail(em, params.id);
        // A chain that holds is verified as of `at` for this officer's worklist.
        if (verification.ok && user.role === 'compliance') await markSeen(em, user, params.id, 'audit-verified', at);
        return verification;
      },
    }),
    route({
      method: 'get', path: '/tenders/:id/audit.csv', tag: 'Audit', access: EVALUATORS, params: tenderIdParamSchema, produces: 'text/csv',
      summary: 'The audit trail as CSV (cells that could start a spreadsheet formula are quoted as text).',
      handler: async ({ em, user, params, res }) => {
        const tender = await findVisibleTender(em, user, params.id);
        sendDownload(res, { filename: exportName(tender.reference, 'audit-trail.csv'), content: await auditCsv(em, params.id, tender.timeZone), type: CSV });
      },
    }),
  ];
}


