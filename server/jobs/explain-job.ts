import type { MikroORM } from '@mikro-orm/postgresql';
import { debriefVendor, explainAward, explainRegion, solveAward } from '../award';
import type { ExplainOptions } from '../award';
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

/** What one kind of job computes, how its end is audited, and what its reader sees when it fails. */
interface JobKind<T> {
  compute: (run: Run, options: ExplainOptions) => Promise<T>;
  audited: (result: T) => { action: string; detail: Record<string, unknown> };
  failed: string;
  name: string;
}

/**
 * Claims the job row of `key`, computes it with the run's own time limit and stores it with its
 * audit entry in one transaction. Safe to run again: a worker that died leaves it `running`, and
 * the retried job claims it again; a done one is left.
 */
async function runJob<T>(orm: MikroORM, key: ExplainJobKey, kind: JobKind<T>): Promise<void> {
  const em = orm.em.fork();
  if (!(await claimExplainJob(em, key))) return;
  const run = await em.findOneOrFail(Run, { id: key.runId }, { populate: ['problem'] });
  const { onProgress, flushed } = progressWriter(orm, key);
  try {
    const result = await kind.compute(run, { solve: (problem) => solveAward(problem, { timeLimitSeconds: run.timeLimitSeconds }), onProgress });
    await flushed();
    await em.transactional(async (tx) => {
      if (!(await finishExplainJob(tx, key, result))) return;
      await audit(tx, { tenderId: run.tender.id, actor: null, subject: `run ${key.runId}`, ...kind.audited(result) });
    });
    logger.info({ ...key }, `${kind.name} done`);
  } catch (err) {
    await flushed();
    logger.error({ err, ...key }, `${kind.name} failed`);
    await failExplainJob(em, key, kind.failed);
  }
}

/** The explanation of one run (server/award/explain.ts `explainAward`), within its budget. */
export function explainRun(orm: MikroORM, runId: string): Promise<void> {
  return runJob(orm, { runId }, {
    name: 'explanation',
    compute: (run, options) => explainAward(run.problem, run.result!, options),
    audited: (result) => ({ action: 'run.explained', detail: { solves: result.solves, seconds: result.seconds } }),
    failed: 'The explanation could not be computed; the error is in the server log. Ask for it again.',
  });
}

/** One vendor's debrief of a run (`debriefVendor`), each forced re-solve with the run's time limit. */
export function debriefRun(orm: MikroORM, runId: string, vendorId: string): Promise<void> {
  return runJob(orm, { runId, vendorId }, {
    name: 'debrief',
    // Nothing to debrief (it won every region it bid): an empty debrief says so.
    compute: async (run, options) => (await debriefVendor(run.problem, run.result!, vendorId, { ...options, budgetSeconds: run.timeLimitSeconds }))
      ?? { vendor: vendorId, vendorName: vendorId, awarded: true, regions: [], uniformReduction: null },
    audited: () => ({ action: 'run.debriefed', detail: { vendorOrganisation: vendorId } }),
    failed: 'The debrief could not be computed; the error is in the server log. Ask for it again.',
  });
}

/**
 * One region of an explanation worked out exactly (`explainRegion`: its forced re-solve with the
 * run's whole time limit). Not proven even then: the region keeps a range, with the longer re-solve's bounds.
 */
export function regionCheckRun(orm: MikroORM, runId: string, region: string): Promise<void> {
  return runJob(orm, { runId, region }, {
    name: 'region check',
    compute: async (run, options) => {
      const result = await explainRegion(run.problem, run.result!, region, { ...options, budgetSeconds: run.timeLimitSeconds });
      if (!result) throw new Error(`No compliant bid lost region ${region}.`);
      return result;
    },
    audited: (result) => ({ action: 'run.region-checked', detail: { region, exact: result.challenger?.exact ?? null } }),
    failed: 'This region could not be worked out; the error is in the server log. Ask for it again.',
  });
}
