import { randomUUID } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import type { AwardResult } from '@shared/award';
import type { DebriefView, ExplanationResult, ExplanationView, RegionCheckView } from '@shared/explanation';
import { SEALED_TENDER_STATUSES, TENDER_STATUSES } from '@shared/tenders';
import { rangesOf } from '../../award';
import { RunDebrief, RunExplanation, RunRegionCheck, type User } from '../../entities';
import { ConflictError, NotFoundError } from '../../http/errors';
import { queueDebrief, queueExplanation, queueRegionCheck } from '../../jobs/queue';
import { audit } from '../audit.service';
import { queueExplainJob, runHasCompliantBid } from '../queries/explanation.queries';
import { lockTender } from '../tender-access';
import { findRun } from './results.service';
import type { EvaluationDeps } from './scenarios.service';

const usable = (r: AwardResult | null | undefined) => !!r && (r.status === 'optimal' || r.status === 'feasible') && r.objective !== null;

/** Runs exist only after closing; an explanation is asked for on any unsealed tender (awarded ones included: it changes nothing). */
const UNSEALED = TENDER_STATUSES.filter((s) => !(SEALED_TENDER_STATUSES as readonly string[]).includes(s));

/**
 * Queues the explanation of a run with an award (a job on the solve queue). Idempotent: one per run;
 * a queued, running or done one is answered as it is (`queued: false`), a failed one is queued again.
 */
export async function startExplanation(deps: EvaluationDeps, user: User, runId: string): Promise<{ view: ExplanationView; queued: boolean }> {
  const run = await findRun(deps.em, user, runId);
  if (!usable(run.result)) throw new ConflictError('Only a run with an award can be explained.');
  const queued = await deps.em.transactional(async (tx) => {
    await lockTender(tx, user, run.tender.id, UNSEALED, 'The bids of this tender are sealed.');
    if (!(await queueExplainJob(tx, { runId: run.id }, randomUUID(), user.id))) return false;
    await audit(tx, { tenderId: run.tender.id, actor: user, action: 'run.explanation-queued', subject: `run ${run.id}` });
    return true;
  });
  if (queued) await queueExplanation(deps.boss, run.id);
  return { view: await explanationOf(deps.em, user, runId), queued };
}

/**
 * GET /api/runs/:id/explanation: where the job is, and its result once done, with the regions worked
 * out exactly since laid over it (`regionChecks` says which, and when).
 */
export async function explanationOf(em: EntityManager, user: User, runId: string): Promise<ExplanationView> {
  const run = await findRun(em, user, runId);
  const row = await em.fork().findOne(RunExplanation, { run: run.id });
  const debriefs = await debriefsOf(em, run.id);
  const regionChecks = await regionChecksOf(em, run.id);
  if (!row) return { runId: run.id, status: 'not-started', progress: { done: 0, total: 0 }, result: null, error: null, queuedAt: null, computedAt: null, debriefs, regionChecks };
  return {
    runId: run.id,
    status: row.status,
    progress: { done: row.progressDone, total: row.progressTotal },
    result: row.status === 'done' && row.result ? withRegionChecks(row.result, regionChecks) : null,
    error: row.error ?? null,
    queuedAt: row.createdAt.toISOString(),
    computedAt: row.computedAt?.toISOString() ?? null,
    debriefs,
    regionChecks,
  };
}

/** The explanation with each region worked out exactly in place of its first figures. */
function withRegionChecks(result: ExplanationResult, checks: RegionCheckView[]): ExplanationResult {
  const exact = new Map(checks.filter((c) => c.result).map((c) => [c.region, c.result!]));
  if (!exact.size) return result;
  const regions = result.regions.map((r) => exact.get(r.region) ?? r);
  return { ...result, regions, ranges: rangesOf(regions) };
}

async function regionChecksOf(em: EntityManager, runId: string): Promise<RegionCheckView[]> {
  const rows = await em.fork().find(RunRegionCheck, { run: runId }, { orderBy: { createdAt: 'asc' } });
  return rows.map((c) => ({
    region: c.region,
    status: c.status,
    result: c.status === 'done' ? c.result ?? null : null,
    error: c.error ?? null,
    queuedAt: c.createdAt.toISOString(),
    computedAt: c.computedAt?.toISOString() ?? null,
  }));
}

/**
 * Queues one region of a done explanation to be worked out exactly: the forced re-solve of its
 * cheapest unawarded bid with the run's whole time limit. Cached per run and region: a queued,
 * running or done one is answered as it is (`queued: false`), a failed one is queued again. 409
 * until the explanation is done; 404 for a region that is not in the run or that no compliant bid lost.
 */
export async function startRegionCheck(deps: EvaluationDeps, user: User, runId: string, region: string): Promise<{ view: ExplanationView; queued: boolean }> {
  const run = await findRun(deps.em, user, runId);
  const explanation = await deps.em.fork().findOne(RunExplanation, { run: run.id });
  if (explanation?.status !== 'done' || !explanation.result) throw new ConflictError('Ask for the explanation first; a region is worked out exactly once the explanation is done.');
  const entry = explanation.result.regions.find((r) => r.region === region);
  if (!entry?.challenger) throw new NotFoundError('A region of this run that a compliant bid lost');
  const queued = await deps.em.transactional(async (tx) => {
    await lockTender(tx, user, run.tender.id, UNSEALED, 'The bids of this tender are sealed.');
    if (!(await queueExplainJob(tx, { runId: run.id, region }, randomUUID(), user.id))) return false;
    await audit(tx, { tenderId: run.tender.id, actor: user, action: 'run.region-check-queued', subject: `run ${run.id}`, detail: { region } });
    return true;
  });
  if (queued) await queueRegionCheck(deps.boss, run.id, region);
  return { view: await explanationOf(deps.em, user, runId), queued };
}

async function debriefsOf(em: EntityManager, runId: string): Promise<DebriefView[]> {
  const rows = await em.fork().find(RunDebrief, { run: runId }, { orderBy: { createdAt: 'asc' } });
  return rows.map((d) => ({
    vendor: d.vendor.id,
    status: d.status,
    progress: { done: d.progressDone, total: d.progressTotal },
    result: d.status === 'done' ? d.result ?? null : null,
    error: d.error ?? null,
    computedAt: d.computedAt?.toISOString() ?? null,
  }));
}

/**
 * Queues one vendor's debrief of a run (what it would have needed; on the solve queue). Cached per
 * run and vendor: a queued, running or done one is answered as it is (`queued: false`), a failed one
 * is queued again. The vendor must have a compliant bid in the run's problem (else 404).
 */
export async function startDebrief(deps: EvaluationDeps, user: User, runId: string, vendorId: string): Promise<{ view: DebriefView; queued: boolean }> {
  const run = await findRun(deps.em, user, runId);
  if (!usable(run.result)) throw new ConflictError('Only a run with an award can be explained.');
  if (!(await runHasCompliantBid(deps.em, run.id, vendorId))) throw new NotFoundError("The vendor's compliant bid in this run");
  const queued = await deps.em.transactional(async (tx) => {
    await lockTender(tx, user, run.tender.id, UNSEALED, 'The bids of this tender are sealed.');
    if (!(await queueExplainJob(tx, { runId: run.id, vendorId }, randomUUID(), user.id))) return false;
    await audit(tx, { tenderId: run.tender.id, actor: user, action: 'run.debrief-queued', subject: `run ${run.id}`, detail: { vendorOrganisation: vendorId } });
    return true;
  });
  if (queued) await queueDebrief(deps.boss, run.id, vendorId);
  const view = (await debriefsOf(deps.em, run.id)).find((d) => d.vendor === vendorId)!;
  return { view, queued };
}
