import { performance } from 'node:perf_hooks';
import type { RunView } from '@shared/evaluation';
import type { ExplanationView } from '@shared/explanation';
import { call, headersOf, signIn, type Session } from './support/http';
import { drive, percentile, stopLoads, summarise, summaryTable, table, type Summary } from './support/measure';
import { benchEnv, startServer, startWorker, stopAll, waitForLog, type Proc } from './support/processes';
import { benchRules, createScenarios, jobLagSeconds, queueAll, secondsBetween, watchRuns } from './support/queue-runs';
import { BENCH_PASSWORD, seedBenchData, seedClosedTwins } from './support/seed';

/**
 * `npm run bench:queue [-- --workers 1,2] [--runs 20] [--time-limit 20] [--poll-seconds 1]
 * [--worker-nice 5,5] [--worker-sched idle,normal] [--timeout-minutes 30]`: the solve queue under
 * load, on a throwaway cluster (support/with-cluster.sh). `--workers 2,2 --worker-sched normal,idle`
 * (or `--worker-nice 0,5`) compares the workers' scheduling side by side.
 *
 * The web server runs with RUN_WORKERS=0 (it only answers HTTP); solves are taken by one, then two,
 * jobs-only processes (`node dist/server/worker.js`, SOLVE_CONCURRENCY=1 each). Each set-up has a
 * closed 30-vendor × 200-region tender of its own with the same bids and the same 20 scenarios;
 * the buyer queues one run of each at once through the API and follows them as the run screen does
 * (GET /api/runs/:id once a second) until all have finished, while a steady light load of
 * GET /api/session measures the web server: first with the workers idle, then while the runs are
 * queued, then while they solve. Prints runs/minute, the longest wait and the session latency side
 * by side; asserts nothing.
 */
const arg = (name: string, fallback: string) => {
  const at = process.argv.indexOf(`--${name}`);
  return at > 0 ? (process.argv[at + 1] ?? fallback) : fallback;
};
const SETUPS = arg('workers', '1,2').split(',').map(Number);
const RUNS = Number(arg('runs', '20'));
const TIME_LIMIT = Number(arg('time-limit', '20'));
const TIMEOUT_MINUTES = Number(arg('timeout-minutes', '30'));
/** How long the explanation of the sole-award run may take before the row reports it unfinished (0: no explanation row). */
const EXPLAIN_MINUTES = Number(arg('explain-minutes', '10'));
/** The workers' niceness per set-up (worker.ts, WORKER_NICE), e.g. `--workers 2,2 --worker-nice 0,5`; else their default. */
const NICE = process.argv.includes('--worker-nice') ? arg('worker-nice', '').split(',') : [];
/** The workers' scheduling class per set-up (worker.ts, WORKER_SCHED: idle or normal); else their default. */
const SCHED = process.argv.includes('--worker-sched') ? arg('worker-sched', '').split(',') : [];
/** The steady load on GET /api/session: a few connections at a fixed rate, light for the server. */
const LOAD = { connections: 2, overallRate: 20 };
const IDLE_SECONDS = 20;
/** How often the buyer's run screen asks for the run (src/app/awards/run-result, RUN_POLL_MS: 1 s). */
const POLL_MS = Number(arg('poll-seconds', '1')) * 1000;

interface SetupResult {
  workers: number;
  /** The workers' environment beyond the defaults (WORKER_NICE, WORKER_SCHED). */
  env: Record<string, string>;
  runs: RunView[];
  queueSeconds: number;
  idle: Summary;
  queueing: Summary;
  solving: Summary;
  /** GET /api/runs/:id as the run screen polls it, while solving. */
  pollMs: number[];
  /** GET /api/tenders/:id/runs (the 20 runs), after the set-up, median of three. */
  listMs: number;
  /** Per run, seconds from its row to its job in the queue (spent in the web server). */
  jobLag: number[];
}

/** Whole seconds left until `until` (epoch ms); fails clearly when the time is up. */
function secondsLeft(until: number, what: string): number {
  const left = Math.floor((until - Date.now()) / 1000);
  if (left < 1) throw new Error(`out of time ${what} (global --timeout-minutes ${TIMEOUT_MINUTES}, or the set-up's own budget)`);
  return left;
}

const setupName = (w: number, env: Record<string, string>) => `${w} worker${w > 1 ? 's' : ''}${env.WORKER_NICE === undefined ? '' : `, nice ${env.WORKER_NICE}`}${env.WORKER_SCHED === undefined ? '' : `, ${env.WORKER_SCHED}`}`;
const workerEnv = (k: number): Record<string, string> => ({ ...(NICE[k] ? { WORKER_NICE: NICE[k] } : {}), ...(SCHED[k] ? { WORKER_SCHED: SCHED[k] } : {}) });
const log = (line: string) => process.stdout.write(`[bench] ${line}\n`);

function sessionLoad(url: string, buyer: Session, label: string, maxSeconds: number, stopWhen?: Promise<unknown>) {
  return drive(label, { url: `${url}/api/session`, ...LOAD, maxSeconds, headers: headersOf(buyer), ...(stopWhen ? { stopWhen } : {}) });
}

async function runSetup(databaseUrl: string, url: string, buyer: Session, tenderId: string, scenarioIds: string[], workers: number, env: Record<string, string>, deadline: number): Promise<SetupResult> {
  const procs: Proc[] = [];
  for (let k = 1; k <= workers; k++) procs.push(startWorker(k, env));
  await Promise.all(procs.map((p) => waitForLog(p, 'worker ready')));
  const name = setupName(workers, env);
  secondsLeft(deadline - IDLE_SECONDS * 1000, `before ${name}`);
  log(`${name} ready; ${IDLE_SECONDS} s of GET /api/session with the queue idle`);
  const idle = summarise(await sessionLoad(url, buyer, `${name}: idle`, IDLE_SECONDS));

  // Every run is queued at once; the session load goes on meanwhile, then until all have finished.
  const queueingSeconds = secondsLeft(deadline, 'before queueing the runs');
  const t0 = performance.now();
  const queued = queueAll(url, buyer, scenarioIds);
  const queueingPhase = sessionLoad(url, buyer, `${name}: queueing`, queueingSeconds, queued);
  const [runIds, queueing] = await Promise.all([queued, queueingPhase.then(summarise)]);
  const queueSeconds = (performance.now() - t0) / 1000;
  log(`${runIds.length} runs queued in ${queueSeconds.toFixed(1)} s; measuring while they solve`);
  // At least enough for every run to reach its time limit one after another on one worker.
  const budget = Math.min(deadline, Date.now() + (RUNS * (TIME_LIMIT + 15) * 1000) / workers + 60_000);
  const solvingSeconds = secondsLeft(budget, 'once the runs were queued');
  const done = watchRuns(url, buyer, tenderId, runIds, {
    pollMs: POLL_MS, deadline: budget,
    onFinished: (_run, n) => { if (n % 5 === 0 || n === runIds.length) log(`${n}/${runIds.length} finished`); },
  });
  const solvingPhase = sessionLoad(url, buyer, `${name}: solving`, solvingSeconds, done);
  const [{ runs, pollMs }, solving] = await Promise.all([done, solvingPhase.then(summarise)]);
  await Promise.all(procs.map((p) => p.stop()));

  // What a buyer's run list of this tender costs the web server, measured outside the windows above.
  const listMs: number[] = [];
  for (let k = 0; k < 3; k++) {
    const s = performance.now();
    await call(url, buyer, 'GET', `/api/tenders/${tenderId}/runs`);
    listMs.push(performance.now() - s);
  }
  const jobLag = await jobLagSeconds(databaseUrl, runIds);
  return { workers, env, runs, queueSeconds, idle, queueing, solving, pollMs, listMs: percentile(listMs, 50), jobLag };
}

const fmt = (n: number | null, digits = 1) => (n === null || Number.isNaN(n) ? '-' : n.toFixed(digits));

function figures(r: SetupResult) {
  const queued = Math.min(...r.runs.map((x) => Date.parse(x.queuedAt)));
  const finished = Math.max(...r.runs.map((x) => Date.parse(x.finishedAt ?? x.queuedAt)));
  const minutes = (finished - queued) / 60_000;
  const waits = r.runs.map((x) => secondsBetween(x.queuedAt, x.startedAt) ?? NaN);
  const solves = r.runs.map((x) => secondsBetween(x.startedAt, x.finishedAt) ?? NaN);
  return { minutes, perMinute: r.runs.length / minutes, longestWait: Math.max(...waits), medianSolve: percentile(solves, 50) };
}

function statusCounts(r: SetupResult): string {
  const counts = new Map<string, number>();
  for (const x of r.runs) counts.set(x.status, (counts.get(x.status) ?? 0) + 1);
  return [...counts].map(([s, n]) => `${n} ${s}`).join(', ');
}

function report(results: SetupResult[]): void {
  const out: string[] = [];
  out.push(`\nSolve queue: ${RUNS} runs of a closed 30-vendor x 200-region tender queued at once, time limit ${TIME_LIMIT} s each;`);
  out.push('web server with RUN_WORKERS=0, jobs-only worker processes with SOLVE_CONCURRENCY=1;');
  out.push(`GET /api/session at ${LOAD.overallRate} req/s over ${LOAD.connections} connections; one run followed at a time (GET /api/runs/:id every ${POLL_MS / 1000} s)\n`);
  out.push(table(
    ['set-up', 'runs', 'total min', 'runs/min', 'longest wait s', 'median solve s', 'session p95 idle ms', 'p95 solving ms', 'ratio'],
    results.map((r) => {
      const f = figures(r);
      return [setupName(r.workers, r.env), r.runs.length, fmt(f.minutes, 2), fmt(f.perMinute, 2), fmt(f.longestWait), fmt(f.medianSolve), fmt(r.idle.p95), fmt(r.solving.p95), fmt(r.solving.p95 / r.idle.p95, 2)];
    }),
  ));
  out.push('GET /api/session: idle; while the 20 POSTs are answered (runs already solving); after that, until all have finished');
  out.push(summaryTable(results.flatMap((r) => [r.idle, r.queueing, r.solving])));
  for (const r of results) {
    const ok = r.solving.p95 <= 2 * r.idle.p95;
    out.push(`target: session p95 during solves <= 2 x idle (${setupName(r.workers, r.env)}) ... ${ok ? 'met' : 'MISSED'} (${fmt(r.solving.p95)} vs ${fmt(2 * r.idle.p95)} ms)`);
  }
  for (const r of results) {
    const awarded = r.runs.every((x) => x.status === 'optimal' || x.status === 'feasible');
    out.push(`runs, ${setupName(r.workers, r.env)}: ${statusCounts(r)} ... ${awarded ? 'all finished with an award' : 'NOT ALL AWARDED'}`);
  }
  out.push('');
  out.push(table(
    ['set-up', 'queueing s', 'session p95 queueing ms', 'row -> job median s', 'row -> job max s', 'GET run p50 ms', 'GET run max ms', 'GET run list ms'],
    results.map((r) => [
      setupName(r.workers, r.env), fmt(r.queueSeconds), fmt(r.queueing.p95), fmt(percentile(r.jobLag, 50)), fmt(Math.max(...r.jobLag)),
      fmt(percentile(r.pollMs, 50)), fmt(Math.max(...r.pollMs)), fmt(r.listMs),
    ]),
  ));
  out.push(`Per scenario (${results.map((r, k) => `#${k + 1} = ${setupName(r.workers, r.env)}`).join(', ')}): status, wait (queued -> started), solve (started -> finished) and the engine's own seconds`);
  const byScenario = (r: SetupResult, scenario: string) => {
    const x = r.runs.find((y) => y.scenarioName === scenario);
    if (!x) return ['-', '-', '-', '-'];
    return [x.status, fmt(secondsBetween(x.queuedAt, x.startedAt)), fmt(secondsBetween(x.startedAt, x.finishedAt)), fmt(x.result?.solveSeconds ?? null)];
  };
  const order = results[0].runs.map((x) => x.scenarioName);
  out.push(table(
    ['scenario', ...results.flatMap((r, k) => [`#${k + 1} status`, `#${k + 1} wait`, `#${k + 1} solve`, `#${k + 1} engine`])],
    order.map((s) => [s, ...results.flatMap((r) => byScenario(r, s))]),
  ));
  process.stdout.write(out.join('\n') + '\n');
}

async function main(): Promise<void> {
  if (!SETUPS.length || !SETUPS.every((n) => Number.isInteger(n) && n >= 1 && n <= 4)) throw new Error('--workers: a list of worker counts from 1 to 4, e.g. 1,2');
  if (NICE.length && (NICE.length !== SETUPS.length || NICE.some((n) => !/^\d$/.test(n)))) throw new Error('--worker-nice: one niceness from 0 to 9 per set-up, e.g. --workers 2,2 --worker-nice 0,5');
  if (SCHED.length && (SCHED.length !== SETUPS.length || SCHED.some((c) => c !== 'idle' && c !== 'normal'))) throw new Error('--worker-sched: idle or normal per set-up, e.g. --workers 2,2 --worker-sched normal,idle');
  if (!(Number.isInteger(RUNS) && RUNS >= 1 && RUNS <= 20)) throw new Error('--runs: a whole number from 1 to 20');
  if (!(POLL_MS >= 200 && POLL_MS <= 60_000)) throw new Error('--poll-seconds: 0.2 to 60');
  if (!(TIMEOUT_MINUTES >= 1 && TIMEOUT_MINUTES <= 120)) throw new Error('--timeout-minutes: 1 to 120');
  if (!(Number.isInteger(TIME_LIMIT) && TIME_LIMIT >= 1 && TIME_LIMIT <= 600)) throw new Error('--time-limit: whole seconds from 1 to 600');
  const deadline = Date.now() + TIMEOUT_MINUTES * 60_000;
  const { databaseUrl } = benchEnv();
  const seeded = await seedBenchData(databaseUrl, { vendors: 30 });
  const orgIds = seeded.vendors.slice(0, 30).map((v) => v.orgId);
  const tenders = await seedClosedTwins(databaseUrl, seeded.buyerEmail, orgIds, SETUPS.length);
  const { proc, url } = await startServer({ RUN_WORKERS: '0' });
  log(`server pid ${proc.child.pid} at ${url} (RUN_WORKERS=0)`);
  const buyer = await signIn(url, seeded.buyerEmail, BENCH_PASSWORD);
  const rules = benchRules(tenders[0].regionCodes, orgIds).slice(0, RUNS);
  const scenarioIds: string[][] = [];
  const t0 = performance.now();
  for (const t of tenders) scenarioIds.push((await createScenarios(url, buyer, t.id, rules, TIME_LIMIT)).map((s) => s.id));
  const each = (performance.now() - t0) / (rules.length * tenders.length);
  log(`${rules.length} scenarios on each of ${tenders.map((t) => t.reference).join(', ')} (${each.toFixed(0)} ms each, one after another); warming up`);
  await sessionLoad(url, buyer, 'warm-up', 5);

  const results: SetupResult[] = [];
  for (const [k, workers] of SETUPS.entries()) results.push(await runSetup(databaseUrl, url, buyer, tenders[k].id, scenarioIds[k], workers, workerEnv(k), deadline));
  report(results);
  if (EXPLAIN_MINUTES > 0) await explanationRow(url, buyer, results[0].runs, deadline);
}

/** Regions whose extra cost is exact, and those given as a range (re-solve not proven in its share of the budget). */
function exactAndRanges(view: ExplanationView): string {
  if (!view.result) return '-';
  const challenged = view.result.regions.filter((r) => r.challenger && r.challenger.extraCost !== null);
  return `${challenged.filter((r) => r.challenger!.exact).length} / ${view.result.ranges}`;
}

/**
 * The explanation of the 'Sole' run (30 × 200, every region sole-awarded) on one worker, asked for
 * through the API and followed as the run screen does; prints the run's own solve seconds, the
 * explanation's seconds (asked → done, as the screen sees it, and the job's own) and their ratio to
 * the run's solve time (target: at most 10), the budget the job was given, and how many regions'
 * extra costs are exact or a range. An explanation still running after
 * `--explain-minutes` is reported with its progress and the time it would take at that pace.
 */
async function explanationRow(url: string, buyer: Session, runs: RunView[], deadline: number): Promise<void> {
  const sole = runs.find((r) => r.scenarioName === 'Sole' && r.result?.objective !== null && r.result?.objective !== undefined);
  if (!sole) { log('no finished Sole run: no explanation row'); return; }
  const worker = startWorker(1, {});
  await waitForLog(worker, 'worker ready');
  const until = Math.min(deadline, Date.now() + EXPLAIN_MINUTES * 60_000);
  const t0 = performance.now();
  const asked = await call<ExplanationView>(url, buyer, 'POST', `/api/runs/${sole.id}/explanation`);
  if (asked.status !== 202 && asked.status !== 200) throw new Error(`POST explanation: ${asked.status} ${JSON.stringify(asked.body)}`);
  let view = asked.body;
  while ((view.status === 'queued' || view.status === 'running') && Date.now() < until) {
    await new Promise((resolve) => setTimeout(resolve, 1000)); // as the screen polls (EXPLANATION_POLL_MS)
    view = (await call<ExplanationView>(url, buyer, 'GET', `/api/runs/${sole.id}/explanation`)).body;
  }
  const seconds = (performance.now() - t0) / 1000;
  await worker.stop();
  const solveSeconds = sole.result!.solveSeconds;
  const finished = view.status === 'done';
  const pace = view.progress.done > 0 ? (seconds * view.progress.total) / view.progress.done : NaN;
  process.stdout.write(`\nExplanation of the 'Sole' run (30 x 200, each region to one vendor), one worker:\n${table(
    ['run solve s', 'explanation s', 'ratio (target <= 10)', 'job s', 'job ratio', 'budget s', 'status', 're-solves', 'regions exact / range', 'progress', 'projected s at this pace'],
    [[fmt(solveSeconds), fmt(seconds), fmt(seconds / solveSeconds), fmt(view.result?.seconds ?? null), fmt(view.result ? view.result.seconds / solveSeconds : null),
      fmt(view.result?.budgetSeconds ?? null), view.status, String(view.result?.solves ?? '-'), exactAndRanges(view),
      `${view.progress.done}/${view.progress.total}`, finished ? fmt(seconds) : fmt(pace, 0)]],
  )}\n`);
}

// Ctrl-C: support/processes.ts stops the server and workers; the load stops too, or the server
// would wait for its open connections before it exits.
let interrupted = false;
for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.once(signal, () => {
    interrupted = true;
    stopLoads();
  });
}

// Bounded in time: past the global timeout the benchmark stops everything and fails.
const guard = setTimeout(() => {
  process.stderr.write(`[bench] failed: not done within the global timeout of ${TIMEOUT_MINUTES} min (--timeout-minutes)\n`);
  void stopAll().finally(() => process.exit(1));
}, (Number.isFinite(TIMEOUT_MINUTES) ? TIMEOUT_MINUTES : 30) * 60_000 + 30_000);

main()
  .catch((err: unknown) => {
    process.stderr.write(interrupted ? '[bench] interrupted; stopping\n' : `[bench] failed: ${err instanceof Error ? err.stack : String(err)}\n`);
    process.exitCode = 1;
  })
  .finally(async () => {
    clearTimeout(guard);
    await stopAll();
  });
