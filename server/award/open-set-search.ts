import { improve, totalOf, type SoleData } from './lagrangian';

/**
 * Iterated local search over which vendors serve, for the sole award model (MODEL.md, "Searching
 * the vendors that serve"). The local search of `improve` (shift, swap, close, open) stops at an
 * award no single move improves; here each round forces one change of the vendors that serve —
 * close one, open one, or both at once (one vendor in place of another) — and runs the local
 * search again from there. A round's award becomes the current one when it is cheaper, or when it
 * is within a small threshold of the best found (threshold accepting, after Dueck & Scheuer 1990);
 * after a number of rounds without a new best the search goes back to the best. This is the
 * scheme of iterated local search as surveyed by Lourenço, Martin & Stützle (2003), with the
 * facility moves of the facility location literature; cited from memory.
 *
 * The vendor to open is drawn with a bias to those the Lagrangian relaxation rates best
 * (`worth`: fee less the relaxed knapsack's value at the multipliers, lower is better), the
 * vendor to close uniformly among those that serve. Pure and synchronous, bounded by `stop`
 * and `rounds`; tests count rounds, never time.
 */
export interface OpenSetSearchOptions {
  /** Per vendor, lower is more promising to open (e.g. the Lagrangian worth); uniform when absent. */
  worth?: Float64Array | null;
  random: () => number;
  /** At most this many rounds. */
  rounds: number;
  /** Ends the search early when it returns true (a deadline). */
  stop?: () => boolean;
  /** Called with each new best award (owner per region, total). */
  onBest?: (owner: Int32Array, total: number) => void;
}

// A round's award is accepted when it is at most this share above the best award (threshold accepting).
const THRESHOLD = 0.002;
// Back to the best award after this many rounds without a new best.
const RESTART_ROUNDS = 40;
const STRENGTH = 2;

/** One forced change of the vendors that serve, in place; false when it cannot be made within the capacities. */
function perturb(data: SoleData, owner: Int32Array, worthOrder: number[] | null, random: () => number): boolean {
  const { m, n, cost, cap, demand, required } = data;
  const load = new Float64Array(m);
  const count = new Int32Array(m);
  for (let j = 0; j < n; j++) { load[owner[j]] += demand[j]; count[owner[j]]++; }
  const serving: number[] = [];
  const closed: number[] = [];
  for (let i = 0; i < m; i++) {
    if (count[i] > 0) { if (!required[i]) serving.push(i); }
    else if (cap[i] > 0) closed.push(i);
  }
  const kind = random();
  const wantsOpen = closed.length > 0 && kind < 0.67;
  const wantsClose = serving.length > 1 && (kind >= 0.33 || !wantsOpen);
  if (!wantsOpen && !wantsClose) return false;
  let opened = -1;
  if (wantsOpen) {
    // Biased to the most promising closed vendors: the k-th of the order with probability falling in k.
    const order = worthOrder ? worthOrder.filter((i) => count[i] === 0 && cap[i] > 0) : closed;
    opened = order[Math.floor(random() * random() * order.length)];
    // The regions it is cheaper for, most saving first, as far as its capacity goes.
    const gains: number[] = [];
    for (let j = 0; j < n; j++) if (cost[opened * n + j] < cost[owner[j] * n + j]) gains.push(j);
    gains.sort((p, q) => (cost[owner[q] * n + q] - cost[opened * n + q]) - (cost[owner[p] * n + p] - cost[opened * n + p]));
    for (const j of gains) {
      if (load[opened] + demand[j] > cap[opened] + 1e-9) continue;
      load[owner[j]] -= demand[j]; count[owner[j]]--;
      load[opened] += demand[j]; count[opened]++;
      owner[j] = opened;
    }
  }
  if (wantsClose) {
    const candidates = serving.filter((i) => i !== opened && count[i] > 0);
    if (candidates.length === 0) return opened >= 0;
    const a = candidates[Math.floor(random() * candidates.length)];
    const regions: number[] = [];
    for (let j = 0; j < n; j++) if (owner[j] === a) regions.push(j);
    regions.sort((p, q) => demand[q] - demand[p]);
    for (const j of regions) {
      // The cheapest vendor that serves and has room; else the cheapest with room.
      let pick = -1;
      let any = -1;
      for (let i = 0; i < m; i++) {
        if (i === a || !(cost[i * n + j] < Infinity) || load[i] + demand[j] > cap[i] + 1e-9) continue;
        if (count[i] > 0 && (pick < 0 || cost[i * n + j] < cost[pick * n + j])) pick = i;
        if (any < 0 || cost[i * n + j] < cost[any * n + j]) any = i;
      }
      const to = pick >= 0 ? pick : any;
      if (to < 0) return false;
      load[a] -= demand[j]; count[a]--;
      load[to] += demand[j]; count[to]++;
      owner[j] = to;
    }
  }
  return true;
}

/**
 * Runs the search from `start` (every region assigned within the capacities). Returns the best
 * award found (owner per region), its total and the rounds run.
 */
export function searchOpenSets(data: SoleData, start: Int32Array, options: OpenSetSearchOptions): { owner: Int32Array; total: number; rounds: number } {
  const worthOrder = options.worth ? Array.from({ length: data.m }, (_, i) => i).sort((a, b) => options.worth![a] - options.worth![b]) : null;
  let current = improve(data, start);
  let currentTotal = totalOf(data, current);
  let best = current;
  let bestTotal = currentTotal;
  const eps = 1e-9 * Math.max(1, Math.abs(bestTotal));
  let sinceBest = 0;
  let k = 0;
  for (; k < options.rounds; k++) {
    if (options.stop?.()) break;
    const trial = Int32Array.from(current);
    const moves = 1 + Math.floor(options.random() * STRENGTH);
    let ok = true;
    for (let t = 0; t < moves && ok; t++) ok = perturb(data, trial, worthOrder, options.random);
    if (!ok) continue;
    const next = improve(data, trial);
    const total = totalOf(data, next);
    if (total < bestTotal - eps) {
      best = next;
      bestTotal = total;
      sinceBest = 0;
      options.onBest?.(next, total);
    } else sinceBest++;
    if (total < currentTotal - eps || total <= bestTotal * (1 + THRESHOLD)) {
      current = next;
      currentTotal = total;
    }
    if (sinceBest > 0 && sinceBest % RESTART_ROUNDS === 0) {
      current = best;
      currentTotal = bestTotal;
    }
  }
  return { owner: best, total: bestTotal, rounds: k };
}
