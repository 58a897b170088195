import type { EntityManager } from '@mikro-orm/postgresql';
import type { AwardProblem, AwardResult, AwardRules } from '@shared/award';
import type { RunView } from '@shared/evaluation';

/** A run's vendors and regions as named in its stored problem (forecast numeric, as PostgreSQL sends it). */
export interface RunNamesRow {
  vendors: RunView['vendors'] | null;
  regions: Record<string, { name: string; forecast: number | string }> | null;
}

/** A vendor of a run's stored problem. */
export interface SolvedVendorRow {
  id: string;
  name: string;
}

/**
 * The names of the vendors and regions a run solved for, read out of its stored problem by
 * PostgreSQL: the run screen polls every second, and parsing the whole problem (every price) for
 * each poll took the web server's CPU from everyone else while runs solved (bench:queue).
 */
export async function runNames(em: EntityManager, runId: string): Promise<RunNamesRow | null> {
  const [row] = await em.execute<RunNamesRow[]>(
    `select (select json_object_agg(v->>'id', json_build_object('name', coalesce(v->>'name', v->>'id'), 'sme', coalesce((v->>'sme')::boolean, false)) order by n)
               from jsonb_array_elements(problem->'vendors') with ordinality as e(v, n)) as vendors,
            (select json_object_agg(r->>'id', json_build_object('name', coalesce(r->>'name', r->>'id'), 'forecast', (r->>'demand')::numeric) order by n)
               from jsonb_array_elements(problem->'regions') with ordinality as e(r, n)) as regions
       from run where id = ?`,
    [runId],
  );
  return row ?? null;
}

/** The exact problem a run solved, as stored (lazy on the entity); null for no such run. */
export async function runProblem(em: EntityManager, runId: string): Promise<AwardProblem | null> {
  const [row] = await em.execute<{ problem: AwardProblem }[]>('select problem from run where id = ?', [runId]);
  return row?.problem ?? null;
}

/** The rules a run actually solved with, without reading its whole problem. */
export async function solvedRules(em: EntityManager, runId: string): Promise<AwardRules | null> {
  const [row] = await em.execute<{ rules: AwardRules | null }[]>(`select problem->'rules' as rules from run where id = ?`, [runId]);
  return row?.rules ?? null;
}

/** The vendors of a run's stored problem (those it solved for). */
export async function solvedVendors(em: EntityManager, runId: string): Promise<SolvedVendorRow[]> {
  return em.execute<SolvedVendorRow[]>(
    `select v->>'id' as id, v->>'name' as name from run, jsonb_array_elements(run.problem->'vendors') v where run.id = ?`, [runId],
  );
}

/** The three built-in scenarios' rules, by their `built_in` key. */
export interface BuiltInScenarios {
  publishedName: string;
  published: AwardRules;
  split: AwardRules;
  sole: AwardRules;
}

/** Adds the built-in scenarios a tender lacks (a unique index per tender and key keeps them once). */
export async function insertBuiltInScenarios(em: EntityManager, tenderId: string, s: BuiltInScenarios): Promise<void> {
  await em.execute(
    `insert into scenario (id, created_at, updated_at, tender_id, name, rules, time_limit_seconds, built_in)
     values (gen_random_uuid(), now(), now(), ?, ?, ?::jsonb, 60, 'published'),
            (gen_random_uuid(), now(), now(), ?, 'All regions split', ?::jsonb, 60, 'split'),
            (gen_random_uuid(), now(), now(), ?, 'All regions sole', ?::jsonb, 60, 'sole')
     on conflict do nothing`,
    [tenderId, s.publishedName, JSON.stringify(s.published), tenderId, JSON.stringify(s.split), tenderId, JSON.stringify(s.sole)],
  );
}

/**
 * Claims a queued run for solving (or one left solving by a worker that died: the retried job
 * takes it again); false for a run cancelled or finished meanwhile.
 */
export async function claimRunForSolving(em: EntityManager, runId: string): Promise<boolean> {
  const claimed = await em.execute<{ id: string }[]>(
    `update run set status = 'solving', started_at = now(), attempts = attempts + 1, updated_at = now()
       where id = ? and status in ('queued', 'solving') returning id`, [runId],
  );
  return claimed.length > 0;
}

/** The run's status now (null for no such run): the solve job polls it to stop a cancelled run. */
export async function runStatusNow(em: EntityManager, runId: string): Promise<string | null> {
  const [row] = await em.execute<{ status: string }[]>(`select status from run where id = ?`, [runId]);
  return row?.status ?? null;
}

/** Stores a run's result if it is still solving; false when it was cancelled meanwhile. */
export async function finishRun(tx: EntityManager, runId: string, result: AwardResult): Promise<boolean> {
  const done = await tx.execute<{ id: string }[]>(
    `update run set status = ?, result = ?::jsonb, finished_at = now(), updated_at = now() where id = ? and status = 'solving' returning id`,
    [result.status, JSON.stringify(result), runId],
  );
  return done.length > 0;
}

/** What the sensitivity panel names, read out of a run's stored problem (increment numeric as text). */
export interface RunLabelsRow {
  increment: string | null;
  /** Vendor id → name. */
  vendors: Record<string, string> | null;
  /** Region code → name. */
  regions: Record<string, string> | null;
  /** The region codes in the problem's order (an object's keys would put number-like codes first). */
  codes: string[] | null;
}

/** The award increment and the names of a run's vendors and regions, without parsing its problem (the panel polls while re-solves run). */
export async function runLabels(em: EntityManager, runId: string): Promise<RunLabelsRow | null> {
  const [row] = await em.execute<RunLabelsRow[]>(
    `select problem->'rules'->>'awardIncrement' as increment,
            (select json_object_agg(v->>'id', coalesce(v->>'name', v->>'id')) from jsonb_array_elements(problem->'vendors') v) as vendors,
            (select json_object_agg(r->>'id', coalesce(r->>'name', r->>'id')) from jsonb_array_elements(problem->'regions') r) as regions,
            (select json_agg(r->>'id' order by n) from jsonb_array_elements(problem->'regions') with ordinality as e(r, n)) as codes
       from run where id = ?`,
    [runId],
  );
  return row ?? null;
}
