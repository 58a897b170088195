import type { MikroORM } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import type { AwardResult } from '@shared/award';
import { AwardInputError, solveAward } from '../award';
import { Run, RunAward } from '../entities';
import { logger } from '../logger';
import { audit } from '../services/audit.service';
import { claimRunForSolving, finishRun, runStatusNow } from '../services/queries/evaluation.queries';
import { debriefRun, explainRun, regionCheckRun } from './explain-job';
import { QUEUES } from './queue';

/** How often a solving run looks whether someone cancelled it. */
const CANCEL_POLL_MS = 1000;

/**
 * Solves one queued run. Safe to run again for the same run: a worker that died mid-solve leaves
 * the run 'solving', and the retried job claims it again; a cancelled or finished run is left alone.
 */
export async function solveRun(orm: MikroORM, runId: string): Promise<void> {
  const em = orm.em.fork();
  if (!(await claimRunForSolving(em, runId))) return;
  const run = await em.findOneOrFail(Run, { id: runId }, { populate: ['problem'] });

  const controller = new AbortController();
  const watch = setInterval(() => {
    runStatusNow(orm.em.fork(), runId)
      .then((status) => { if (status === 'cancelled') controller.abort(new Error('cancelled')); })
      .catch((err: unknown) => logger.warn({ err, runId }, 'could not check for cancellation'));
  }, CANCEL_POLL_MS);

  let result: AwardResult;
  try {
    result = await solveAward(run.problem, { signal: controller.signal, timeLimitSeconds: run.timeLimitSeconds });
  } catch (err) {
    if (controller.signal.aborted) return;
    result = {
      status: 'failed', objective: null, fixedCost: null, variableCost: null, bound: null, boundSource: null, gap: null,
      solveSeconds: 0, engine: 'none', awards: [],
      diagnosis: err instanceof AwardInputError ? err.errors.map((e) => `${e.field}: ${e.message}`) : ['The award engine failed; the error is in the server log.'],
    };
    if (!(err instanceof AwardInputError)) logger.error({ err, runId }, 'award engine failed');
  } finally {
    clearInterval(watch);
  }

  await em.transactional(async (tx) => {
    if (!(await finishRun(tx, runId, result))) return; // cancelled meanwhile
    for (const award of result.awards) {
      for (const line of award.lines) {
        tx.create(RunAward, { run: runId, vendorOrganisation: award.vendor, regionCode: line.region, quantity: line.quantity, unitPrice: line.unitPrice, cost: line.cost });
      }
    }
    await tx.flush();
    await audit(tx, {
      tenderId: run.tender.id, actor: null, action: 'run.finished', subject: `run ${runId}`,
      detail: { status: result.status, objective: result.objective, engine: result.engine, solveSeconds: result.solveSeconds },
      after: result,
    });
  });
  logger.info({ runId, status: result.status, objective: result.objective, seconds: result.solveSeconds }, 'run finished');
}

/** Takes solve jobs (runs and explanations) from the queue; `concurrency` runs at once in this process. */
export async function startSolveWorker(boss: PgBoss, orm: MikroORM, concurrency = 1): Promise<void> {
  // One pg-boss worker per concurrent solve (each fetches one job at a time).
  for (let i = 0; i < concurrency; i++) {
    await boss.work<{ runId: string; explain?: boolean; debriefVendor?: string; exactRegion?: string }>(QUEUES.solve, { batchSize: 1, pollingIntervalSeconds: 1 }, async (jobs) => {
      // The same queue carries runs, their explanations, debriefs and regions worked out exactly (server/jobs/explain-job.ts).
      for (const job of jobs) {
        await (job.data.debriefVendor ? debriefRun(orm, job.data.runId, job.data.debriefVendor)
          : job.data.exactRegion ? regionCheckRun(orm, job.data.runId, job.data.exactRegion)
          : job.data.explain ? explainRun(orm, job.data.runId) : solveRun(orm, job.data.runId));
      }
    });
  }
}
