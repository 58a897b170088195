import type { AwardResult } from '../../shared/award';
import { closeSolverPool, solveAward, type EngineId } from '../award/index';
import { matchesPublished, readInstance, readOptima, REFERENCE_DIR, referenceAvailable, type ReferenceEntry } from './reference';

/**
 * Benchmark of the award engine on the published instances in ../shared/reference:
 * orlib-cap (Beasley 1988) split and sole, Holmberg, Rönnqvist & Yuan (1999) sole, Yang, Chu &
 * Chen (2012) sole. Each instance runs with plain glpk.js, HiGHS alone and the Tendara engine one
 * after the other in the same process, so the three columns share the machine's conditions.
 *
 *   npm run bench:award -- [--limit 60] [--set orlib|holmberg|yang|all] [--only p1,cap61] [--engines glpk,highs,tendara]
 *
 * Prints a table and totals; asserts nothing (this is a measurement, not a test). The peak memory
 * column is the resident set of this process — the solver worker threads run inside it — sampled
 * every 50 ms during the solve (process.memoryUsage.rss(); the kernel's own high-water mark,
 * process.resourceUsage().maxRSS, covers the whole process life, so it cannot tell one solve).
 */
type SetName = 'orlib' | 'holmberg' | 'yang' | 'all';
interface Options { limit: number; set: SetName; only: string[] | null; engines: EngineId[] }
const SETS: Record<ReferenceEntry['set'], SetName> = { 'orlib-cap': 'orlib', holmberg: 'holmberg', yang: 'yang' };

function parseArgs(argv: string[]): Options {
  const o: Options = { limit: 60, set: 'all', only: null, engines: ['glpk', 'highs', 'tendara'] };
  for (let k = 0; k < argv.length; k++) {
    const a = argv[k];
    const next = () => argv[++k] ?? '';
    if (a === '--limit') o.limit = Number(next());
    else if (a === '--set') o.set = next() as SetName;
    else if (a === '--only') o.only = next().split(',').map((s) => s.trim()).filter(Boolean);
    else if (a === '--engines') o.engines = next().split(',').map((s) => s.trim()) as EngineId[];
    else throw new Error(`unknown option ${a}`);
  }
  if (!(o.limit > 0) || !['orlib', 'holmberg', 'yang', 'all'].includes(o.set) || o.engines.some((e) => !['glpk', 'highs', 'tendara'].includes(e))) {
    throw new Error('usage: award-bench [--limit SECONDS] [--set orlib|holmberg|yang|all] [--only NAMES] [--engines glpk,highs,tendara]');
  }
  return o;
}

const ENGINE_LABEL: Record<EngineId, string> = { glpk: 'glpk.js alone', highs: 'HiGHS alone', tendara: 'Tendara' };

interface Row { engine: EngineId; seconds: number; hit: boolean; status: string; peakMb: number }

/** Peak resident set of this process (solver threads included) while `run` runs, in MB, sampled every 50 ms. */
async function withPeakRss<T>(run: () => Promise<T>): Promise<{ value: T; peakMb: number }> {
  let peak = process.memoryUsage.rss();
  const sample = setInterval(() => { peak = Math.max(peak, process.memoryUsage.rss()); }, 50);
  try {
    const value = await run();
    peak = Math.max(peak, process.memoryUsage.rss());
    return { value, peakMb: peak / 2 ** 20 };
  } finally {
    clearInterval(sample);
  }
}

async function main(): Promise<void> {
  const opts = parseArgs(process.argv.slice(2));
  if (!referenceAvailable()) {
    process.stdout.write(`Reference instances not found at ${REFERENCE_DIR}; nothing to benchmark.\n`);
    return;
  }
  const jobs: { entry: ReferenceEntry; mode: 'split' | 'sole'; optimum: number }[] = [];
  for (const entry of readOptima()) {
    if (opts.only && !opts.only.includes(entry.name)) continue;
    if (opts.set !== 'all' && SETS[entry.set] !== opts.set) continue;
    if (entry.set === 'orlib-cap') {
      if (entry.splitOptimum !== null) jobs.push({ entry, mode: 'split', optimum: entry.splitOptimum });
      if (entry.soleOptimum !== null) jobs.push({ entry, mode: 'sole', optimum: entry.soleOptimum });
    }
    if (entry.set !== 'orlib-cap' && entry.soleOptimum !== null) jobs.push({ entry, mode: 'sole', optimum: entry.soleOptimum });
  }
  const cols = ['instance', 'size', 'mode', 'engine', 'seconds', 'objective', 'published', 'difference', 'status', 'peak MB'];
  const widths = [10, 8, 6, 34, 8, 14, 14, 11, 10, 8];
  const line = (cells: string[]) => cells.map((c, k) => (k >= 4 && k <= 7) || k === 9 ? c.padStart(widths[k]) : c.padEnd(widths[k])).join(' ');
  process.stdout.write(`Time limit ${opts.limit} s per instance and engine; engines: ${opts.engines.map((e) => ENGINE_LABEL[e]).join(', ')}.\n`);
  process.stdout.write(`${line(cols)}\n${'-'.repeat(widths.reduce((s, w) => s + w + 1, 0))}\n`);
  const rows: Row[] = [];
  for (const job of jobs) {
    const problem = readInstance(job.entry, job.mode);
    for (const engine of opts.engines) {
      const t0 = performance.now();
      let result: AwardResult;
      let peakMb: number;
      try {
        ({ value: result, peakMb } = await withPeakRss(() => solveAward(problem, { engine, timeLimitSeconds: opts.limit })));
      } catch (err) {
        process.stdout.write(`${job.entry.name} ${engine}: error ${err instanceof Error ? err.message : String(err)}\n`);
        continue;
      }
      const seconds = (performance.now() - t0) / 1000;
      const hit = result.objective !== null && matchesPublished(result.objective, job.optimum);
      const diff = result.objective === null ? '' : (result.objective - job.optimum).toFixed(2);
      const label = `${ENGINE_LABEL[engine]}: ${result.engine.replace(/ \(GLPK [^)]*\)/, '')}`;
      rows.push({ engine, seconds, hit, status: result.status, peakMb });
      process.stdout.write(`${line([
        job.entry.name, `${job.entry.vendors}x${job.entry.regions}`, job.mode, label.slice(0, widths[3]), seconds.toFixed(2),
        result.objective === null ? '-' : result.objective.toFixed(2), job.optimum.toFixed(2), diff,
        hit ? result.status : `${result.status}*`, peakMb.toFixed(0),
      ])}\n`);
    }
  }
  process.stdout.write('\nTotals (* = published optimum not reached):\n');
  for (const engine of opts.engines) {
    const mine = rows.filter((r) => r.engine === engine);
    const hits = mine.filter((r) => r.hit).length;
    const total = mine.reduce((s, r) => s + r.seconds, 0);
    const proven = mine.filter((r) => r.status === 'optimal').length;
    process.stdout.write(`  ${ENGINE_LABEL[engine].padEnd(14)} optima reached ${hits}/${mine.length}, proven optimal ${proven}, total ${total.toFixed(1)} s, slowest ${Math.max(0, ...mine.map((r) => r.seconds)).toFixed(1)} s, peak memory ${Math.max(0, ...mine.map((r) => r.peakMb)).toFixed(0)} MB\n`);
  }
}

main().then(
  () => closeSolverPool(),
  async (err: unknown) => { process.stderr.write(`${err instanceof Error ? err.message : String(err)}\n`); process.exitCode = 1; await closeSolverPool(); },
);
