import { randomUUID } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import type { AwardResult } from '@shared/award';
import type { DebriefView, ExplanationView } from '@shared/explanation';
import { SEALED_TENDER_STATUSES, TENDER_STATUSES } from '@shared/tenders';
import { RunDebrief, RunExplanation, type User } from '../../entities';
import { ConflictError, NotFoundError } from '../../http/errors';
import { queueDebrief, queueExplanation } from '../../jobs/queue';
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

/** GET /api/runs/:id/explanation: where the job is, and its result once done. */
export async function explanationOf(em: EntityManager, user: User, runId: string): Promise<ExplanationView> {
  const run = await findRun(em, user, runId);
  const row = await em.fork().findOne(RunExplanation, { run: run.id });
  const debriefs = await debriefsOf(em, run.id);
  if (!row) return { runId: run.id, status: 'not-started', progress: { done: 0, total: 0 }, result: null, error: null, queuedAt: null, computedAt: null, debriefs };
  return {
    runId: run.id,
    status: row.status,
    progress: { done: row.progressDone, total: row.progressTotal },
    result: row.status === 'done' ? row.result ?? null : null,
    error: row.error ?? null,
    queuedAt: row.createdAt.toISOString(),
    computedAt: row.computedAt?.toISOString() ?? null,
    debriefs,
  };
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
