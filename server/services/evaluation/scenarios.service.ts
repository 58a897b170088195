import type { EntityManager } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import { awardRulesSchema } from '@shared/award';
import type { AwardProblem, AwardRules } from '@shared/award';
import { basisDifference, whatIfNote } from '@shared/award-basis';
import type { AwardBasis } from '@shared/tenders';
import type { RunStatus, RunSummary, ScenarioInput, ScenarioView } from '@shared/evaluation';
import { isSealed } from '@shared/tenders';
import { Run, Scenario, type Tender, type User } from '../../entities';
import { ConflictError, NotFoundError, ValidationError } from '../../http/errors';
import { QUEUES } from '../../jobs/queue';
import { audit, digestOf } from '../audit.service';
import { insertBuiltInScenarios } from '../queries/evaluation.queries';
import { findVisibleTender, lockTender } from '../tender-access';
import { transition } from '../transition';
import { buildProblem, plainRules } from './problem';

export interface EvaluationDeps {
  em: EntityManager;
  boss: PgBoss;
}

/** Whether rules are the tender's published award basis; if not, the what-if's note in words. */
export function awardability(rules: AwardRules, basis: AwardBasis): { awardable: boolean; whatIf: string | null } {
  const difference = basisDifference(rules, basis);
  return { awardable: !difference, whatIf: difference ? whatIfNote(difference) : null };
}

/** A run as lists show it; awardable when its scenario's rules are the published basis. */
export function runSummary(run: Run, basis: AwardBasis): RunSummary {
  return {
    id: run.id,
    scenarioId: run.scenario.id,
    scenarioName: run.scenario.name,
    ...awardability(run.scenario.rules, basis),
    status: run.status,
    queuedAt: run.createdAt.toISOString(),
    startedAt: run.startedAt?.toISOString() ?? null,
    finishedAt: run.finishedAt?.toISOString() ?? null,
    timeLimitSeconds: run.timeLimitSeconds,
    objective: run.result?.objective ?? null,
    droppedVendor: run.droppedVendor ?? null,
  };
}

/** Why a change to an awarded tender's evaluation is refused (409). */
export const FROZEN = 'This tender is awarded: its scenarios and bids are frozen.';

/** Evaluation happens on closed tenders; once awarded, scenarios and runs are frozen. */
export async function evaluableTender(em: EntityManager, user: User, tenderId: string, forChange = false): Promise<Tender> {
  const tender = await findVisibleTender(em, user, tenderId);
  if (tender.status === 'cancelled') {
    throw new ConflictError('This tender was cancelled before closing: its bids stay sealed and are never evaluated.');
  }
  if (isSealed(tender.status)) {
    throw new ConflictError('Award scenarios can be built only after the closing time, when the bids are unsealed.');
  }
  if (forChange && tender.status !== 'closed') {
    throw new ConflictError(FROZEN);
  }
  await ensureBuiltInScenarios(em, tender);
  return tender;
}

/** The name of the scenario that holds the tender's published award basis. */
export const PUBLISHED_BASIS = 'Published award basis';

/**
 * Every closed tender starts with its published award basis as its first scenario (the only one
 * whose runs can be recommended), and two what-ifs for analysis unless the basis is one of them:
 * all regions split, and all regions sole. Made once, on first evaluation after closing (tenders
 * closed before the basis existed get theirs then too).
 */
export async function ensureBuiltInScenarios(em: EntityManager, tender: Tender): Promise<void> {
  const existing = await em.count(Scenario, { tender, builtIn: { $ne: null } });
  if (existing >= 3) return;
  const published: AwardRules = awardRulesSchema.parse(tender.awardBasis);
  await insertBuiltInScenarios(em, tender.id, { publishedName: PUBLISHED_BASIS, published, split: plainRules('split'), sole: plainRules('sole') });
}

function scenarioView(s: Scenario, latest: Run | undefined, basis: AwardBasis): ScenarioView {
  return {
    id: s.id, tenderId: s.tender.id, name: s.name, rules: s.rules, timeLimitSeconds: s.timeLimitSeconds,
    builtIn: s.builtIn ?? null, ...awardability(s.rules, basis),
    createdAt: s.createdAt.toISOString(), latestRun: latest ? runSummary(latest, basis) : null,
  };
}

export async function listScenarios(em: EntityManager, user: User, tenderId: string): Promise<ScenarioView[]> {
  const tender = await evaluableTender(em, user, tenderId);
  const scenarios = await em.find(Scenario, { tender }, { orderBy: { builtIn: 'asc', createdAt: 'asc' } });
  const runs = await em.find(Run, { tender, parent: null }, { populate: ['scenario'], orderBy: { createdAt: 'desc' } });
  return scenarios.map((s) => scenarioView(s, runs.find((r) => r.scenario.id === s.id), tender.awardBasis));
}

/** Rules must name this tender's regions and bidders. */
async function checkRules(em: EntityManager, tender: Tender, input: ScenarioInput): Promise<void> {
  const rules = awardRulesSchema.parse(input.rules);
  const { problem, bidders: vendors } = await buildProblem(em, tender, rules, 1);
  const regions = new Set(problem.regions.map((r) => r.id));
  const errors = [
    ...rules.soleRegions.flatMap((c, i) => (regions.has(c) ? [] : [{ field: `rules.soleRegions[${i}]`, message: `Region ${c} is not part of this tender.` }])),
    ...rules.exclude.flatMap((v, i) => (vendors.has(v) ? [] : [{ field: `rules.exclude[${i}]`, message: 'This vendor has no submitted bid on this tender.' }])),
    ...rules.require.flatMap((v, i) => (vendors.has(v) ? [] : [{ field: `rules.require[${i}]`, message: 'This vendor has no submitted bid on this tender.' }])),
  ];
  if (errors.length) throw new ValidationError(errors);
}

export async function createScenario(deps: EvaluationDeps, user: User, tenderId: string, input: ScenarioInput & { timeLimitSeconds: number }): Promise<ScenarioView> {
  const { em } = deps;
  const tender = await evaluableTender(em, user, tenderId, true);
  await checkRules(em, tender, input);
  const scenario = await em.transactional(async (tx) => {
    await lockTender(tx, user, tender.id, ['closed'], FROZEN);
    if (await tx.count(Scenario, { tender: tender.id, name: input.name })) {
      throw new ConflictError('A scenario with this name exists.', [{ field: 'name', message: 'Choose another name.' }]);
    }
    const s = tx.create(Scenario, { tender: tender.id, name: input.name, rules: awardRulesSchema.parse(input.rules), timeLimitSeconds: input.timeLimitSeconds, createdBy: user });
    await tx.flush();
    await audit(tx, { tenderId: tender.id, actor: user, action: 'scenario.created', subject: `scenario ${s.name}`, detail: { rules: s.rules }, after: s.rules });
    return s;
  });
  return scenarioView(scenario, undefined, tender.awardBasis);
}

export async function updateScenario(deps: EvaluationDeps, user: User, scenarioId: string, input: ScenarioInput & { timeLimitSeconds: number }): Promise<ScenarioView> {
  const { em } = deps;
  const scenario = await em.findOne(Scenario, { id: scenarioId });
  if (!scenario) throw new NotFoundError('The scenario');
  const tender = await evaluableTender(em, user, scenario.tender.id, true);
  if (scenario.builtIn) throw new ConflictError('The built-in scenarios cannot be changed; create your own.');
  await checkRules(em, tender, input);
  const before = scenario.rules;
  await em.transactional(async (tx) => {
    await lockTender(tx, user, tender.id, ['closed'], FROZEN);
    const s = await tx.findOneOrFail(Scenario, { id: scenarioId });
    tx.assign(s, { name: input.name, rules: awardRulesSchema.parse(input.rules), timeLimitSeconds: input.timeLimitSeconds });
    await tx.flush();
    await audit(tx, { tenderId: tender.id, actor: user, action: 'scenario.updated', subject: `scenario ${s.name}`, before, after: s.rules });
  });
  return scenarioView(await em.fork().findOneOrFail(Scenario, { id: scenarioId }), undefined, tender.awardBasis);
}

/** Run states that make a second solve of the same input pointless: it is waiting, solving, or solved. */
const REUSABLE_RUN: RunStatus[] = ['queued', 'solving', 'optimal', 'feasible', 'infeasible'];

/**
 * A child run re-solves its parent's stored problem, changed one way: without one vendor (the
 * drop-out check) or with the forecasts scaled (forecast sensitivity, all regions or one alone).
 */
export interface ChildOf {
  parent: Run;
  droppedVendor?: string;
  forecastChangePercent?: number;
  scaledRegion?: string;
}

/** What one run will solve: the problem (bids and rules), its digest, and for a child run what it changes. */
export interface RunInput {
  scenario: Scenario;
  problem: AwardProblem;
  digest: string;
  timeLimitSeconds: number;
  child?: ChildOf;
}

/** A run of the scenario's rules over the tender's live bids. */
export async function runInput(em: EntityManager, tender: Tender, scenario: Scenario): Promise<RunInput> {
  const rules = awardRulesSchema.parse(scenario.rules);
  const { problem, digest } = await buildProblem(em, tender, rules, scenario.timeLimitSeconds);
  return { scenario, problem, digest, timeLimitSeconds: scenario.timeLimitSeconds };
}

/**
 * A child run over `problem`, derived from the parent's stored problem (so it keeps every rule and
 * exclusion the parent solved with, whatever changed in the scenario or the bids since).
 */
export function childInput(child: ChildOf, problem: AwardProblem): RunInput {
  return { scenario: child.parent.scenario, problem, digest: digestOf(problem), timeLimitSeconds: child.parent.timeLimitSeconds, child };
}

/**
 * Inside the caller's transaction, which holds the tender's lock (`lockTender`): the run of the same
 * scenario (and the same change, for a child run) over the same input digest that is queued, solving
 * or solved, or else a new queued run with its audit entry. `created` says which; queue the new
 * one's job after commit.
 */
export async function findOrCreateRun(tx: EntityManager, user: User, tenderId: string, input: RunInput): Promise<{ run: Run; created: boolean }> {
  const { scenario, problem, digest, child } = input;
  const change = {
    parent: child?.parent.id ?? null, droppedVendor: child?.droppedVendor ?? null,
    forecastChangePercent: child?.forecastChangePercent ?? null, scaledRegion: child?.scaledRegion ?? null,
  };
  const existing = await tx.findOne(Run, {
    scenario: scenario.id, inputDigest: digest, status: { $in: REUSABLE_RUN }, ...change,
  }, { populate: ['scenario'], orderBy: { createdAt: 'desc' } });
  if (existing) return { run: existing, created: false };
  const r = tx.create(Run, {
    tender: tenderId, scenario: scenario.id, requestedBy: user, timeLimitSeconds: input.timeLimitSeconds, problem, inputDigest: digest, ...change,
  });
  await tx.flush();
  const action = !child ? 'run.queued' : child.droppedVendor ? 'run.resilience-queued' : 'run.sensitivity-queued';
  await audit(tx, {
    tenderId, actor: user, action, subject: `run ${r.id}`,
    detail: {
      scenario: scenario.name,
      ...(child ? { parentRun: child.parent.id } : {}),
      ...(child?.droppedVendor ? { droppedVendor: child.droppedVendor } : {}),
      ...(child?.forecastChangePercent !== undefined ? { forecastChangePercent: child.forecastChangePercent, scaledRegion: child.scaledRegion ?? null } : {}),
    },
    after: { inputDigest: digest },
  });
  return { run: r, created: true };
}

/**
 * Queues the re-solves of a run (drop-out or forecast checks) under the tender's lock, each found or
 * created once (cached), and hands the new ones to the solver after the transaction commits.
 */
export async function queueChildRuns(deps: EvaluationDeps, user: User, tenderId: string, inputs: readonly RunInput[]): Promise<{ queued: number }> {
  const created = await deps.em.transactional(async (tx) => {
    await lockTender(tx, user, tenderId, ['closed'], FROZEN);
    const fresh: Run[] = [];
    for (const input of inputs) {
      const child = await findOrCreateRun(tx, user, tenderId, input);
      if (child.created) fresh.push(child.run);
    }
    return fresh;
  });
  for (const child of created) await sendToSolver(deps.boss, child);
  return { queued: created.length };
}

/** Hands a new run to the solve queue: a pg-boss job any worker process may take. */
export async function sendToSolver(boss: PgBoss, run: Run): Promise<void> {
  await boss.send(QUEUES.solve, { runId: run.id }, {
    retryLimit: 3, retryDelay: 1,
    // A worker that dies mid-solve lets the job expire; pg-boss then gives it to another worker.
    expireInSeconds: run.timeLimitSeconds + 30,
  });
}

/**
 * Queues a solve of the scenario (`created`: answered 202). Idempotent: when a run of the same
 * scenario over the same input (same digest: bids, rules, time limit) is queued, solving or solved,
 * that run is returned instead (answered 200) — repeated or concurrent requests never make twins.
 * A failed or cancelled run does not count: the scenario can be run again.
 */
export async function queueRun(deps: EvaluationDeps, user: User, scenarioId: string): Promise<{ run: Run; created: boolean }> {
  const { em } = deps;
  const scenario = await em.findOne(Scenario, { id: scenarioId });
  if (!scenario) throw new NotFoundError('The scenario');
  const tender = await evaluableTender(em, user, scenario.tender.id, true);
  const input = await runInput(em, tender, scenario);
  const result = await em.transactional(async (tx) => {
    await lockTender(tx, user, tender.id, ['closed'], FROZEN);
    return findOrCreateRun(tx, user, tender.id, input);
  });
  if (result.created) await sendToSolver(deps.boss, result.run);
  return result;
}

export async function listRuns(em: EntityManager, user: User, tenderId: string): Promise<RunSummary[]> {
  const tender = await evaluableTender(em, user, tenderId);
  const runs = await em.find(Run, { tender, parent: null }, { populate: ['scenario'], orderBy: { createdAt: 'desc' } });
  return runs.map((r) => runSummary(r, tender.awardBasis));
}

export async function cancelRun(em: EntityManager, user: User, runId: string): Promise<RunSummary> {
  const run = await em.findOne(Run, { id: runId }, { populate: ['scenario'] });
  if (!run) throw new NotFoundError('The run');
  const tender = await findVisibleTender(em, user, run.tender.id);
  await em.transactional(async (tx) => {
    await transition(tx, Run, runId, ['queued', 'solving'], { status: 'cancelled', finishedAt: new Date() }, 'This run has already finished.');
    await audit(tx, { tenderId: run.tender.id, actor: user, action: 'run.cancelled', subject: `run ${run.id}` });
  });
  em.clear();
  return runSummary(await em.findOneOrFail(Run, { id: runId }, { populate: ['scenario'] }), tender.awardBasis);
}
