import type { MikroORM } from '@mikro-orm/postgresql';
import { explainAward, solveAward } from '../award';
import { Run } from '../entities';
import { logger } from '../logger';
import { audit } from '../services/audit.service';

/** Progress is written at most this often (the run screen polls each second). */
const PROGRESS_EVERY_MS = 500;

/**
 * Computes the explanation of one run (server/award/explain.ts) and stores it. Safe to run again:
 * a worker that died leaves it `running`, and the retried job claims it again; a done one is left.
 */
export async function explainRun(orm: MikroORM, runId: string): Promise<void> {
  const em = orm.em.fork();
  const claimed = await em.execute<{ id: string }[]>(
    `update run_explanation set status = 'running', started_at = now(), attempts = attempts + 1, updated_at = now()
       where run_id = ? and status in ('queued', 'running') returning id`, [runId],
  );
  if (!claimed.length) return;
  const run = await em.findOneOrFail(Run, { id: runId }, { populate: ['problem'] });
  let written = 0;
  let pending: Promise<unknown> = Promise.resolve();
  const onProgress = (done: number, total: number) => {
    const now = Date.now();
    if (done !== 0 && done !== total && now - written < PROGRESS_EVERY_MS) return;
    written = now;
    pending = pending.then(() => orm.em.fork().getConnection().execute(
      `update run_explanation set progress_done = ?, progress_total = ?, updated_at = now() where run_id = ? and status = 'running'`, [done, total, runId],
    )).catch((err: unknown) => logger.warn({ err, runId }, 'could not store explanation progress'));
  };
  try {
    const result = await explainAward(run.problem, run.result!, {
      solve: (problem) => solveAward(problem, { timeLimitSeconds: run.timeLimitSeconds }),
      onProgress,
    });
    await pending;
    await em.transactional(async (tx) => {
      const done = await tx.execute<{ id: string }[]>(
        `update run_explanation set status = 'done', result = ?::jsonb, error = null, computed_at = now(), progress_done = progress_total, updated_at = now()
           where run_id = ? and status = 'running' returning id`, [JSON.stringify(result), runId],
      );
      if (!done.length) return;
      await audit(tx, { tenderId: run.tender.id, actor: null, action: 'run.explained', subject: `run ${runId}`, detail: { solves: result.solves, seconds: result.seconds } });
    });
    logger.info({ runId, solves: result.solves, seconds: result.seconds }, 'run explained');
  } catch (err) {
    await pending;
    logger.error({ err, runId }, 'explanation failed');
    await em.execute(`update run_explanation set status = 'failed', error = ?, updated_at = now() where run_id = ? and status = 'running'`,
      ['The explanation could not be computed; the error is in the server log. Ask for it again.', runId]);
  }
}
