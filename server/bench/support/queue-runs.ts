import type { AwardRules } from '@shared/award';
import type { RunSummary, RunView, ScenarioView } from '@shared/evaluation';
import { performance } from 'node:perf_hooks';
import { Client } from 'pg';
import { call, type Session } from './http';

/**
 * What the queue benchmark does as the buyer, through the real API: create scenarios of a closed
 * tender, queue one run of each at once, and follow the runs until every one has finished.
 */

const FINISHED = new Set(['optimal', 'feasible', 'infeasible', 'failed', 'cancelled']);

/**
 * Twenty award rule sets a buyer might try on one tender: split and sole, vendor counts and
 * shares, sole regions, exclusions, SME shares. Every one is feasible on the seeded 30 × 200 tender
 * (a third of the vendors can carry at most a quarter of the forecast, the rest anything).
 */
export function benchRules(regionCodes: string[], vendorIds: string[]): { name: string; rules: Partial<AwardRules> }[] {
  const first = (n: number) => regionCodes.slice(0, n);
  const last = (n: number) => regionCodes.slice(-n);
  return [
    { name: 'Split', rules: { sourcing: 'split' } },
    { name: 'Sole', rules: { sourcing: 'sole' } },
    { name: 'At most 5 vendors', rules: { maxVendors: 5 } },
    { name: 'At most 10 vendors', rules: { maxVendors: 10 } },
    { name: 'Share at most 25 %', rules: { maxVendorShare: 0.25 } },
    { name: 'Share at most 15 %', rules: { maxVendorShare: 0.15 } },
    { name: 'Dual sourcing 70 %', rules: { maxRegionShare: 0.7 } },
    { name: 'First 50 regions sole', rules: { soleRegions: first(50) } },
    { name: 'Last 100 regions sole', rules: { soleRegions: last(100) } },
    { name: 'Without three vendors', rules: { exclude: vendorIds.slice(0, 3) } },
    { name: 'Two vendors kept', rules: { require: vendorIds.slice(3, 5) } },
    { name: 'SME 20 %', rules: { smeShare: 0.2 } },
    { name: 'At least 4 vendors', rules: { minVendors: 4 } },
    { name: '8 vendors, 30 % each', rules: { maxVendors: 8, maxVendorShare: 0.3 } },
    { name: 'Sole, at most 10 vendors', rules: { sourcing: 'sole', maxVendors: 10 } },
    { name: 'Awards of 2000 t or more', rules: { minAwardQuantity: 2000 } },
    { name: 'Without five vendors', rules: { exclude: vendorIds.slice(5, 10) } },
    { name: 'SME 30 %, 12 vendors', rules: { smeShare: 0.3, maxVendors: 12 } },
    { name: 'Sole, share at most 20 %', rules: { sourcing: 'sole', maxVendorShare: 0.2 } },
    { name: 'Dual sourcing 50 %', rules: { maxRegionShare: 0.5 } },
  ];
}

/** Creates the scenarios (POST /api/tenders/:id/scenarios) and returns their ids, in order. */
export async function createScenarios(
  url: string, buyer: Session, tenderId: string, all: { name: string; rules: Partial<AwardRules> }[], timeLimitSeconds: number,
): Promise<ScenarioView[]> {
  const out: ScenarioView[] = [];
  for (const s of all) {
    const res = await call<ScenarioView>(url, buyer, 'POST', `/api/tenders/${tenderId}/scenarios`, { name: s.name, rules: s.rules, timeLimitSeconds });
    if (res.status !== 201) throw new Error(`creating scenario "${s.name}": ${res.status} ${JSON.stringify(res.body)}`);
    out.push(res.body);
  }
  return out;
}

/** Queues one run of each scenario, all requests sent at once (POST /api/scenarios/:id/runs). */
export async function queueAll(url: string, buyer: Session, scenarioIds: string[]): Promise<string[]> {
  return Promise.all(
    scenarioIds.map(async (id) => {
      const res = await call<{ id: string; status: string }>(url, buyer, 'POST', `/api/scenarios/${id}/runs`);
      if (res.status !== 202) throw new Error(`queueing a run of scenario ${id}: ${res.status} ${JSON.stringify(res.body)}`);
      return res.body.id;
    }),
  );
}

export interface WatchOptions {
  pollMs: number;
  /** Fails when the runs have not all finished by then (epoch ms). */
  deadline: number;
  /** Called when a run is seen finished. */
  onFinished?: (run: RunView, finished: number) => void;
}

/**
 * Follows the runs as the buyer's run screen does: GET /api/runs/:id of the run on screen once a
 * second (src/app/awards/run-result). The oldest unfinished run is the one on screen; when it has
 * finished, the next one is asked for at once. Returns every run as last seen (finished) and each
 * request's latency.
 */
export async function watchRuns(url: string, buyer: Session, tenderId: string, runIds: string[], o: WatchOptions): Promise<{ runs: RunView[]; pollMs: number[] }> {
  const runs: RunView[] = [];
  const pollMs: number[] = [];
  for (;;) {
    while (runs.length < runIds.length) {
      const t0 = performance.now();
      const run = await runDetail(url, buyer, runIds[runs.length]);
      pollMs.push(performance.now() - t0);
      if (!FINISHED.has(run.status)) break;
      runs.push(run);
      o.onFinished?.(run, runs.length);
    }
    if (runs.length === runIds.length) return { runs, pollMs };
    if (Date.now() > o.deadline) {
      const list = await call<RunSummary[]>(url, buyer, 'GET', `/api/tenders/${tenderId}/runs`);
      const open = (list.body ?? []).filter((r) => runIds.includes(r.id) && !FINISHED.has(r.status)).map((r) => `${r.scenarioName}: ${r.status}`);
      throw new Error(`runs still unfinished at the set-up's deadline: ${open.join('; ')}`);
    }
    await new Promise((r) => setTimeout(r, o.pollMs));
  }
}

/** The engine's own figures of a finished run (GET /api/runs/:id). */
export async function runDetail(url: string, buyer: Session, runId: string): Promise<RunView> {
  const res = await call<RunView>(url, buyer, 'GET', `/api/runs/${runId}`);
  if (res.status !== 200) throw new Error(`GET /api/runs/${runId}: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body;
}

/** Seconds between two ISO times (null when either is missing). */
export function secondsBetween(from: string | null, to: string | null): number | null {
  return from && to ? (Date.parse(to) - Date.parse(from)) / 1000 : null;
}

/**
 * Seconds from each run's row (its queued time) to its job in the queue (pg-boss's created_on), read
 * from the database: the part of a run's wait spent in the web server before any worker could see it.
 */
export async function jobLagSeconds(databaseUrl: string, runIds: string[]): Promise<number[]> {
  const db = new Client({ connectionString: databaseUrl });
  await db.connect();
  try {
    const { rows } = await db.query<{ lag: number }>(
      `select extract(epoch from (j.created_on - r.created_at))::float8 as lag
         from run r join pgboss.job j on j.name = 'award-solve' and j.data->>'runId' = r.id::text
        where r.id = any($1::uuid[])`,
      [runIds],
    );
    return rows.map((r) => r.lag);
  } finally {
    await db.end();
  }
}
