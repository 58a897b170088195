import type { EntityManager } from '@mikro-orm/postgresql';
import { awardRulesSchema, type AwardProblem, type AwardResult } from '@shared/award';
import { FINISHED_RUN_STATUSES, FORECAST_STEPS, type SensitivityCase, type SensitivityCheck, type SensitivityInput, type SensitivityView } from '@shared/evaluation';
import { Run, type User } from '../../entities';
import { ConflictError, ValidationError } from '../../http/errors';
import { runLabels } from '../queries/evaluation.queries';
import { findRun, storedProblem } from './results.service';
import { childInput, evaluableTender, queueChildRuns, type EvaluationDeps } from './scenarios.service';

/**
 * Forecast sensitivity: how stable a run's award is if the forecasts are off. The run's stored
 * problem (its bids, rules and exclusions exactly) is re-solved with every forecast — or one
 * region's alone — changed by each of FORECAST_STEPS (−20 %, −10 %, +10 %, +20 %), as child runs
 * on the solve queue, like the drop-out check. Each case is compared with the run's award: the
 * same vendors winning the same regions, or the changes in words.
 */

const usable = (r: AwardResult | null | undefined): r is AwardResult & { objective: number } =>
  !!r && (r.status === 'optimal' || r.status === 'feasible') && r.objective !== null;

/**
 * A forecast changed by `percent`. With an award increment the result is rounded to the nearest
 * whole multiple of it (at least one), because the engine refuses a forecast that is not one (the
 * tender's own rule); so a step smaller than half an increment leaves a region unchanged. Without
 * one it is rounded to 4 decimals, the precision forecasts are stored with.
 */
export function scaleForecast(forecast: number, percent: number, increment?: number): number {
  const scaled = (forecast * (100 + percent)) / 100;
  if (increment !== undefined && increment > 0) return Math.max(1, Math.round(scaled / increment)) * increment;
  return Math.round(scaled * 10_000) / 10_000;
}

/** The run's problem with every forecast (or only `regionCode`'s) changed by `percent`. */
export function scaledProblem(problem: AwardProblem, percent: number, regionCode?: string): AwardProblem {
  const increment = awardRulesSchema.parse(problem.rules ?? {}).awardIncrement;
  return {
    ...problem,
    regions: problem.regions.map((r) => (regionCode === undefined || r.id === regionCode ? { ...r, demand: scaleForecast(r.demand, percent, increment) } : r)),
  };
}

/** Vendor → the regions it supplies (quantity above 0). */
function supplied(result: AwardResult): Map<string, Set<string>> {
  return new Map(result.awards.map((a) => [a.vendor, new Set(a.lines.filter((l) => l.quantity > 0).map((l) => l.region))]));
}

function list(items: string[]): string {
  return items.length <= 1 ? items.join('') : `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

/**
 * What differs between two awards, in words: vendors no longer awarded, vendors newly awarded (with
 * their regions), and regions an awarded vendor gains or loses. Empty: the same vendors win the
 * same regions (quantities may differ: they follow the forecasts).
 */
export function awardChanges(base: AwardResult, other: AwardResult, vendorName: (id: string) => string, regionName: (code: string) => string): string[] {
  const before = supplied(base);
  const after = supplied(other);
  const names = (codes: Iterable<string>) => list([...codes].map(regionName));
  const out: string[] = [];
  for (const [vendor, regions] of before) {
    const now = after.get(vendor);
    if (!now) {
      out.push(`${vendorName(vendor)} would no longer be awarded`);
      continue;
    }
    const gained = [...now].filter((r) => !regions.has(r));
    const lost = [...regions].filter((r) => !now.has(r));
    if (gained.length) out.push(`${vendorName(vendor)} would also supply ${names(gained)}`);
    if (lost.length) out.push(`${vendorName(vendor)} would no longer supply ${names(lost)}`);
  }
  for (const [vendor, regions] of after) {
    if (!before.has(vendor)) out.push(`${vendorName(vendor)} would be awarded (${names(regions)})`);
  }
  return out;
}

/** A change in per cent as the sentences write it: "−20 %", "0 %", "+10 %". */
export function signedPercent(percent: number): string {
  if (percent === 0) return '0 %';
  return `${percent > 0 ? '+' : '−'}${Math.abs(percent)} %`;
}

/**
 * The widest range of tested changes around 0 % in which every case keeps the award: walking out
 * from 0 % step by step on each side, up to the first case that changes it or is not known.
 */
export function stableRange(cases: Pick<SensitivityCase, 'changePercent' | 'sameAward'>[]): { from: number; to: number } {
  const walk = (steps: number[]) => {
    let edge = 0;
    for (const step of steps) {
      if (cases.find((c) => c.changePercent === step)?.sameAward !== true) break;
      edge = step;
    }
    return edge;
  };
  const steps = cases.map((c) => c.changePercent);
  return {
    from: walk(steps.filter((s) => s < 0).sort((a, b) => b - a)),
    to: walk(steps.filter((s) => s > 0).sort((a, b) => a - b)),
  };
}

/**
 * The summary sentence of a finished check: the range in which the same vendors win the same
 * regions, which changes were tested (nothing in between or beyond is claimed), and what happens
 * at the first step outside the range.
 */
export function stabilitySentence(cases: SensitivityCase[], regionName: string | null): string {
  const { from, to } = stableRange(cases);
  const steps = cases.map((c) => c.changePercent).sort((a, b) => a - b);
  const of = regionName ? `the forecast of ${regionName} alone` : 'all forecasts';
  const tested = `tested at ${list(steps.map(signedPercent))} of ${of}; nothing in between or beyond was tried`;
  const head = from === 0 && to === 0
    ? `The award does not stay the same at any change tested (${tested}).`
    : `The same vendors win the same regions between ${signedPercent(from)} and ${signedPercent(to)} (${tested}).`;
  const edge = (step: number | undefined) => {
    const c = step === undefined ? undefined : cases.find((x) => x.changePercent === step);
    if (!c) return '';
    return c.sameAward === false
      ? ` At ${signedPercent(c.changePercent)} the award changes.`
      : ` At ${signedPercent(c.changePercent)} the outcome is not known (the re-solve did not finish).`;
  };
  const below = steps.filter((s) => s < from).sort((a, b) => b - a)[0];
  const above = steps.find((s) => s > to);
  const unproven = cases.some((c) => c.status === 'feasible')
    ? ' Some re-solves reached the time limit: their totals are the best found, not proven best.'
    : '';
  return `${head}${edge(below)}${edge(above)}${unproven}`;
}

/**
 * Queues the re-solves of the run's forecast sensitivity check (all regions, or `regionCode`
 * alone), in one transaction under the tender's lock. Cached per run: a case already queued,
 * solving or solved is not solved again (`queued` counts the new ones; 0 is answered 200).
 */
export async function startSensitivity(deps: EvaluationDeps, user: User, runId: string, input: SensitivityInput): Promise<{ queued: number }> {
  const run = await findRun(deps.em, user, runId);
  if (run.parent) throw new ConflictError('This is already a re-solve of another run.');
  if (!usable(run.result)) throw new ConflictError('Only a run with an award can be checked for forecast changes.');
  const tender = await evaluableTender(deps.em, user, run.tender.id, true);
  const problem = await storedProblem(deps.em, run.id);
  const regionCode = input.regionCode;
  if (regionCode !== undefined && !problem.regions.some((r) => r.id === regionCode)) {
    throw new ValidationError([{ field: 'regionCode', message: `Region ${regionCode} is not one of this run's regions.` }]);
  }
  const inputs = FORECAST_STEPS.map((percent) =>
    childInput({ parent: run, forecastChangePercent: percent, scaledRegion: regionCode }, scaledProblem(problem, percent, regionCode)));
  return queueChildRuns(deps, user, tender.id, inputs);
}

/** The run's sensitivity checks so far: each case's total and changes, and each check's summary. */
export async function sensitivityOf(em: EntityManager, user: User, runId: string): Promise<SensitivityView> {
  const run = await findRun(em, user, runId);
  // Names and the increment only, read by PostgreSQL: the screen polls while re-solves run.
  const row = await runLabels(em, run.id);
  const vendors = new Map(Object.entries(row?.vendors ?? {}));
  const regions = new Map(Object.entries(row?.regions ?? {}));
  const vendorName = (id: string) => vendors.get(id) ?? id;
  const regionName = (code: string) => regions.get(code) ?? code;
  const children = await em.find(Run, { parent: run, forecastChangePercent: { $ne: null } }, { orderBy: { createdAt: 'asc' } });
  // The latest re-solve per case (a failed or cancelled one may have been followed by another).
  const latest = new Map(children.map((c) => [`${c.scaledRegion ?? ''}|${c.forecastChangePercent}`, c]));
  const base = run.result;

  const check = (regionCode: string | null): SensitivityCheck | null => {
    const cases: SensitivityCase[] = [];
    for (const percent of FORECAST_STEPS) {
      const c = latest.get(`${regionCode ?? ''}|${percent}`);
      if (!c) continue;
      const finished = FINISHED_RUN_STATUSES.includes(c.status);
      const res = c.result;
      let sameAward: boolean | null = null;
      let changes: string[] = [];
      if (finished && usable(res) && usable(base)) {
        changes = awardChanges(base, res, vendorName, regionName);
        sameAward = changes.length === 0;
      } else if (c.status === 'infeasible') {
        sameAward = false;
        changes = ['No award would meet the rules', ...(res?.diagnosis ?? [])];
      } else if (finished) {
        changes = ['The re-solve did not finish: the outcome is not known'];
      }
      cases.push({
        changePercent: percent, runId: c.id, status: c.status, objective: usable(res) ? res.objective : null,
        vendorsAwarded: usable(res) ? res.awards.length : null, sameAward, changes,
      });
    }
    if (!cases.length) return null;
    const pending = cases.filter((c) => !FINISHED_RUN_STATUSES.includes(c.status)).length;
    const name = regionCode === null ? null : regionName(regionCode);
    const range = pending ? null : stableRange(cases);
    return {
      regionCode, regionName: name, cases, pending,
      stableFrom: range?.from ?? null, stableTo: range?.to ?? null,
      summary: pending ? `${pending} of ${cases.length} re-solves still running.` : stabilitySentence(cases, name),
    };
  };

  const codes = row?.codes ?? [];
  const scaled = new Set(children.map((c) => c.scaledRegion).filter((c): c is string => !!c));
  return {
    runId: run.id,
    objective: base?.objective ?? null,
    vendorsAwarded: usable(base) ? base.awards.length : 0,
    steps: [...FORECAST_STEPS],
    awardIncrement: row?.increment ? Number(row.increment) : null,
    all: check(null),
    regions: codes.filter((c) => scaled.has(c)).map((c) => check(c)).filter((c): c is SensitivityCheck => c !== null),
  };
}
