import type { EntityManager } from '@mikro-orm/postgresql';
import { awardRulesSchema, type AwardProblem, type AwardResult } from '@shared/award';
import { soleAwardCostRange } from '@shared/award-wording';
import { recordByCode } from '@shared/bids';
import type { Comparison, ComparedRun, ResilienceView, RunView } from '@shared/evaluation';
import { Run, Scenario, type User } from '../../entities';
import { ConflictError, NotFoundError, ValidationError } from '../../http/errors';
import { runNames, runProblem } from '../queries/evaluation.queries';
import { awardability, childInput, evaluableTender, queueChildRuns, runSummary, type EvaluationDeps } from './scenarios.service';

export async function findRun(em: EntityManager, user: User, runId: string): Promise<Run> {
  const run = await em.findOne(Run, { id: runId }, { populate: ['scenario', 'tender'] });
  if (!run) throw new NotFoundError('The run');
  await evaluableTender(em, user, run.tender.id);
  return run;
}

/** The names of the vendors and regions a run solved for (`runNames`: read by PostgreSQL, not parsed here). */
async function namesOf(em: EntityManager, runId: string): Promise<Pick<RunView, 'vendors' | 'regions'>> {
  const row = await runNames(em, runId);
  const regions = recordByCode(Object.entries(row?.regions ?? {}).map(([id, r]) => [id, { name: r.name, forecast: Number(r.forecast) }] as const));
  return { vendors: row?.vendors ?? {}, regions };
}

export async function runView(em: EntityManager, user: User, runId: string): Promise<RunView> {
  const run = await findRun(em, user, runId);
  const names = await namesOf(em, runId);
  return {
    ...runSummary(run, run.tender.awardBasis),
    tenderId: run.tender.id,
    currency: run.tender.currency,
    unit: run.tender.unit,
    inputDigest: run.inputDigest,
    result: run.result ?? null,
    parentRunId: run.parent?.id ?? null,
    forecastChangePercent: run.forecastChangePercent ?? null,
    scaledRegion: run.scaledRegion ?? null,
    ...names,
  };
}

const usable = (r: AwardResult | null | undefined) => !!r && (r.status === 'optimal' || r.status === 'feasible') && r.objective !== null;

/** The latest finished run of a built-in scenario (not a resilience re-solve). */
async function latestBuiltIn(em: EntityManager, tenderId: string, kind: 'split' | 'sole'): Promise<Run | null> {
  const scenario = await em.findOne(Scenario, { tender: tenderId, builtIn: kind });
  if (!scenario) return null;
  return em.findOne(Run, { scenario, parent: null, status: { $in: ['optimal', 'feasible'] } }, { orderBy: { finishedAt: 'desc' } });
}

function regionsSplit(result: AwardResult): number {
  const suppliers = new Map<string, number>();
  for (const a of result.awards) for (const l of a.lines) if (l.quantity > 0) suppliers.set(l.region, (suppliers.get(l.region) ?? 0) + 1);
  return [...suppliers.values()].filter((n) => n > 1).length;
}

/** Runs side by side, each priced against the plain split baseline; and the cost of sole award. */
export async function compareRuns(em: EntityManager, user: User, tenderId: string, runIds: string[]): Promise<Comparison> {
  const tender = await evaluableTender(em, user, tenderId);
  const runs = await em.find(Run, { id: { $in: runIds }, tender }, { populate: ['scenario'] });
  if (runs.length !== new Set(runIds).size) {
    throw new ValidationError([{ field: 'runs', message: 'Some runs do not belong to this tender.' }]);
  }
  const split = await latestBuiltIn(em, tender.id, 'split');
  const sole = await latestBuiltIn(em, tender.id, 'sole');
  const base = split?.result?.objective ?? null;
  const ordered = runIds.map((id) => runs.find((r) => r.id === id)!);
  const columns: ComparedRun[] = ordered.map((r) => {
    const res = r.result;
    const ok = usable(res);
    const over = ok && base !== null ? res!.objective! - base : null;
    return {
      runId: r.id,
      scenarioName: r.scenario.name,
      ...awardability(r.scenario.rules, tender.awardBasis),
      status: r.status,
      objective: ok ? res!.objective : null,
      fixedCost: ok ? res!.fixedCost : null,
      variableCost: ok ? res!.variableCost : null,
      vendorsAwarded: ok ? res!.awards.length : 0,
      largestShare: ok && res!.awards.length ? Math.max(...res!.awards.map((a) => a.share)) : null,
      regionsSplit: ok ? regionsSplit(res!) : 0,
      priceOverSplit: over,
      priceOverSplitPercent: over !== null && base ? over / base : null,
    };
  });
  return {
    currency: tender.currency,
    runs: columns,
    baseline: split && base !== null ? { runId: split.id, objective: base } : null,
    costOfSoleAward: soleAwardCostRange(split?.result, sole?.result),
  };
}

/** The exact problem a run solved, as stored (lazy on the entity). */
export async function storedProblem(em: EntityManager, runId: string): Promise<AwardProblem> {
  const problem = await runProblem(em, runId);
  if (!problem) throw new NotFoundError('The run');
  return problem;
}

/** The vendors a run's rules require (rule `require`): they cannot be dropped. */
function requiredVendors(problem: AwardProblem): Set<string> {
  return new Set(awardRulesSchema.parse(problem.rules ?? {}).require);
}

/**
 * Re-solves the run without each awarded vendor in turn: one queued run per vendor, all created in
 * one transaction under the tender's lock. Each re-solve is the run's own stored problem with the
 * vendor added to `exclude`, so it keeps every rule and exclusion the run solved with (the
 * scenario's excludes, the compliance check's exclusions), whatever changed since. A vendor the
 * rules require is not dropped: the award cannot exist without it by the scenario's own rules, so
 * nothing is re-solved and the check says so. Idempotent: a vendor whose re-solve is already
 * queued, solving or solved (same input) gets no second one; `queued` counts the new runs (0: 200).
 */
export async function startResilience(deps: EvaluationDeps, user: User, runId: string): Promise<{ queued: number }> {
  const run = await findRun(deps.em, user, runId);
  if (run.parent) throw new ConflictError('This is already a re-solve of another run.');
  if (!usable(run.result)) throw new ConflictError('Only a run with an award can be checked for resilience.');
  const tender = await evaluableTender(deps.em, user, run.tender.id, true);
  const problem = await storedProblem(deps.em, run.id);
  const required = requiredVendors(problem);
  const rules = awardRulesSchema.parse(problem.rules ?? {});
  const inputs = run.result!.awards
    .filter((award) => !required.has(award.vendor))
    .map((award) => childInput(
      { parent: run, droppedVendor: award.vendor },
      { ...problem, rules: { ...rules, exclude: [...new Set([...rules.exclude, award.vendor])] } },
    ));
  return queueChildRuns(deps, user, tender.id, inputs);
}

export async function resilienceOf(em: EntityManager, user: User, runId: string): Promise<ResilienceView> {
  const run = await findRun(em, user, runId);
  // The latest re-solve per vendor (a failed or cancelled one may have been followed by another).
  const all = await em.find(Run, { parent: run, droppedVendor: { $ne: null } }, { orderBy: { createdAt: 'asc' } });
  const children = new Map(all.map((c) => [c.droppedVendor!, c]));
  const base = run.result?.objective ?? null;
  const names = new Map(Object.entries((await namesOf(em, run.id)).vendors).map(([id, v]) => [id, v.name]));
  const awarded = usable(run.result) ? run.result!.awards.map((a) => a.vendor) : [];
  const required = awarded.length ? requiredVendors(await storedProblem(em, run.id)) : new Set<string>();
  type Row = ResilienceView['rows'][number];
  const rows: Row[] = [];
  // Awarded vendors in the award's order: a required one as such (never re-solved), the others once re-solved.
  const vendors = [...awarded.filter((v) => required.has(v) || children.has(v)), ...[...children.keys()].filter((v) => !awarded.includes(v))];
  for (const vendor of vendors) {
    const vendorName = names.get(vendor) ?? vendor;
    const c = children.get(vendor);
    if (required.has(vendor) || !c) {
      rows.push({ vendor, vendorName, status: run.status, objective: null, increase: null, increasePercent: null, diagnosis: [], worst: false, required: true });
      continue;
    }
    const obj = usable(c.result) ? c.result!.objective! : null;
    const increase = obj !== null && base !== null ? obj - base : null;
    rows.push({
      vendor, vendorName, status: c.status, objective: obj,
      increase, increasePercent: increase !== null && base ? increase / base : null,
      diagnosis: c.result?.diagnosis ?? [], worst: false, required: false,
    });
  }
  // Worst case among the vendors that could drop out: losing one makes the award impossible, else the largest increase.
  const done = rows.filter((r) => !r.required && (r.status === 'infeasible' || r.increase !== null));
  const worst = done.find((r) => r.status === 'infeasible') ?? done.sort((a, b) => (b.increase ?? 0) - (a.increase ?? 0))[0];
  if (worst) worst.worst = true;
  return { runId: run.id, objective: base, rows };
}
