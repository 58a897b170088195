import type { MikroORM } from '@mikro-orm/postgresql';
import { debriefVendor, explainAward, explainRegion, solveAward } from '../award';
import { Run } from '../entities';
import { logger } from '../logger';
import { audit } from '../services/audit.service';
import {
  claimExplainJob, type ExplainJobKey, failExplainJob, finishExplainJob, storeExplainProgress,
} from '../services/queries/explanation.queries';

/** Progress is written at most this often (the run screen polls each second). */
const PROGRESS_EVERY_MS = 500;

/** Progress of a job row, written at most every PROGRESS_EVERY_MS (and at the start and the end). */
function progressWriter(orm: MikroORM, key: ExplainJobKey) {
  let written = 0;
  let pending: Promise<unknown> = Promise.resolve();
  const onProgress = (done: number, total: number) => {
    const now = Date.now();
    if (done !== 0 && done !== total && now - written < PROGRESS_EVERY_MS) return;
    written = now;
    pending = pending.then(() => storeExplainProgress(orm.em.fork(), key, done, total))
      .catch((err: unknown) => logger.warn({ err, ...key }, 'could not store progress'));
  };
  return { onProgress, flushed: () => pending };
}

/**
 * Computes the explanation of one run (server/award/explain.ts) and stores it. Safe to run again:
 * a worker that died leaves it `running`, and the retried job claims it again; a done one is left.
 */
export async function explainRun(orm: MikroORM, runId: string): Promise<void> {
  const em = orm.em.fork();
  const key: ExplainJobKey = { runId };
  if (!(await claimExplainJob(em, key))) return;
  const run = await em.findOneOrFail(Run, { id: runId }, { populate: ['problem'] });
  const { onProgress, flushed } = progressWriter(orm, key);
  try {
    const result = await explainAward(run.problem, run.result!, {
      solve: (problem) => solveAward(problem, { timeLimitSeconds: run.timeLimitSeconds }),
      onProgress,
    });
    await flushed();
    await em.transactional(async (tx) => {
      if (!(await finishExplainJob(tx, key, result))) return;
      await audit(tx, { tenderId: run.tender.id, actor: null, action: 'run.explained', subject: `run ${runId}`, detail: { solves: result.solves, seconds: result.seconds } });
    });
    logger.info({ runId, solves: result.solves, seconds: result.seconds }, 'run explained');
  } catch (err) {
    await flushed();
    logger.error({ err, runId }, 'explanation failed');
    await failExplainJob(em, key, 'The explanation could not be computed; the error is in the server log. Ask for it again.');
  }
}

/**
 * Computes one vendor's debrief of a run (`debriefVendor`, each forced re-solve with the run's time
 * limit) and stores it in `run_debrief`; claimed and retried as the explanation is.
 */
export async function debriefRun(orm: MikroORM, runId: string, vendorId: string): Promise<void> {
  const em = orm.em.fork();
  const key: ExplainJobKey = { runId, vendorId };
  if (!(await claimExplainJob(em, key))) return;
  const run = await em.findOneOrFail(Run, { id: runId }, { populate: ['problem'] });
  const { onProgress, flushed } = progressWriter(orm, key);
  try {
    const found = await debriefVendor(run.problem, run.result!, vendorId, {
      solve: (problem) => solveAward(problem, { timeLimitSeconds: run.timeLimitSeconds }),
      budgetSeconds: run.timeLimitSeconds,
      onProgress,
    });
    await flushed();
    // Nothing to debrief (it won every region it bid): an empty debrief says so.
    const result = found ?? { vendor: vendorId, vendorName: vendorId, awarded: true, regions: [], uniformReduction: null };
    await em.transactional(async (tx) => {
      if (!(await finishExplainJob(tx, key, result))) return;
      await audit(tx, { tenderId: run.tender.id, actor: null, action: 'run.debriefed', subject: `run ${runId}`, detail: { vendorOrganisation: vendorId } });
    });
  } catch (err) {
    await flushed();
    logger.error({ err, runId, vendorId }, 'debrief failed');
    await failExplainJob(em, key, 'The debrief could not be computed; the error is in the server log. Ask for it again.');
  }
}

/**
 * Works one region of an explanation out exactly (`explainRegion`: its forced re-solve with the
 * run's whole time limit) and stores it in `run_region_check`; claimed and retried as the
 * explanation is. Not proven even then: the region keeps a range, now with the longer re-solve's bounds.
 */
export async function regionCheckRun(orm: MikroORM, runId: string, region: string): Promise<void> {
  const em = orm.em.fork();
  const claimed = await em.execute<{ id: string }[]>(
    `update run_region_check set status = 'running', started_at = now(), attempts = attempts + 1, updated_at = now()
       where run_id = ? and region = ? and status in ('queued', 'running') returning id`, [runId, region],
  );
  if (!claimed.length) return;
  const run = await em.findOneOrFail(Run, { id: runId }, { populate: ['problem'] });
  try {
    const result = await explainRegion(run.problem, run.result!, region, {
      solve: (problem) => solveAward(problem, { timeLimitSeconds: run.timeLimitSeconds }),
      budgetSeconds: run.timeLimitSeconds,
    });
    if (!result) throw new Error(`No compliant bid lost region ${region}.`);
    await em.transactional(async (tx) => {
      const done = await tx.execute<{ id: string }[]>(
        `update run_region_check set status = 'done', result = ?::jsonb, error = null, computed_at = now(), updated_at = now()
           where run_id = ? and region = ? and status = 'running' returning id`, [JSON.stringify(result), runId, region],
      );
      if (!done.length) return;
      await audit(tx, { tenderId: run.tender.id, actor: null, action: 'run.region-checked', subject: `run ${runId}`, detail: { region, exact: result.challenger?.exact ?? null } });
    });
  } catch (err) {
    logger.error({ err, runId, region }, 'region check failed');
    await em.execute(`update run_region_check set status = 'failed', error = ?, updated_at = now() where run_id = ? and region = ? and status = 'running'`,
      ['This region could not be worked out; the error is in the server log. Ask for it again.', runId, region]);
  }
}
