import type { MipModel, ModelMap } from './model';

/**
 * Lagrangian relaxation of the sole award model (see MODEL.md, "Lagrangian bound"). The rows
 * "one vendor per region" (Σ_i z_ij = 1) are moved into the objective with multipliers u_j;
 * what is left splits into one 0-1 knapsack per vendor — which regions vendor i would take at
 * prices c_ij − u_j within its capacity — and the choice of vendors, kept to the aggregate
 * capacity row Σ_i K_i y_i ≥ D (implied by the model, so the relaxation stays a relaxation).
 * Every L(u) is a lower bound on the best award; the multipliers follow the subgradient method
 * with the step rule of Held, Wolfe & Crowder (1974) as described by Fisher (1981). Each
 * relaxed solution is repaired into an award (the Lagrangian heuristic) so the search also finds
 * awards. Pure and synchronous: the neighbourhood-search worker runs it on its own thread.
 */

/** The sole award model in the shape the relaxation needs; vendors that cannot be awarded have no prices. */
export interface SoleData {
  m: number;
  n: number;
  fee: Float64Array;
  /** Effective capacity K̄_i (0 for a vendor that cannot be awarded). */
  cap: Float64Array;
  demand: Float64Array;
  required: Uint8Array;
  /** c_ij = p_ij d_j at [i * n + j]; Infinity where vendor i cannot take region j. */
  cost: Float64Array;
  totalDemand: number;
  /** Fewest vendors any award opens (the model's minimum-vendors and fewest-vendors rows; 0 when neither). */
  fewestVendors: number;
  /** Every cost of the model is a whole number: so is every award's total, and a bound can be rounded up. */
  integral: boolean;
  /** The model's columns: y_i, z_ij (-1 where absent). */
  numCols: number;
  open: number[];
  supply: number[][];
}

/**
 * Reads a sole award model (every region sole) back into SoleData, or null when the model is
 * not one (split regions): the relaxation is written for sole award only.
 */
export function soleData(model: MipModel, map: Pick<ModelMap, 'open' | 'supply' | 'soleColumn'>): SoleData | null {
  const m = map.open.length;
  const n = map.soleColumn.length;
  if (m === 0 || n === 0 || map.soleColumn.some((s) => !s)) return null;
  const fee = new Float64Array(m);
  const cap = new Float64Array(m);
  const demand = new Float64Array(n).fill(NaN);
  const required = new Uint8Array(m);
  const cost = new Float64Array(m * n).fill(Infinity);
  const rowOf = new Map(model.rowNames.map((name, r) => [name, r]));
  for (let i = 0; i < m; i++) {
    const y = map.open[i];
    if (y < 0 || model.colUpper[y] < 0.5) continue;
    const r = rowOf.get(`capacity_${i}`);
    if (r === undefined) return null;
    fee[i] = model.colCost[y];
    required[i] = model.colLower[y] > 0.5 ? 1 : 0;
    const coef = new Map<number, number>();
    for (let k = model.rowStarts[r]; k < model.rowStarts[r + 1]; k++) coef.set(model.rowIndex[k], model.rowValue[k]);
    cap[i] = -(coef.get(y) ?? 0);
    for (let j = 0; j < n; j++) {
      const c = map.supply[i][j];
      if (c < 0) continue;
      const d = coef.get(c);
      if (d === undefined) return null;
      demand[j] = d;
      if (model.colUpper[c] >= 0.5) cost[i * n + j] = model.colCost[c];
    }
  }
  if (demand.some((d) => !(d > 0))) return null;
  const whole = (v: number) => Math.abs(v - Math.round(v)) <= 1e-9 * Math.max(1, Math.abs(v));
  const integral = model.colCost.every(whole);
  let fewestVendors = 0;
  for (const name of ['min_vendors', 'fewest_vendors']) {
    const r = rowOf.get(name);
    if (r !== undefined && Number.isFinite(model.rowLower[r])) fewestVendors = Math.max(fewestVendors, Math.ceil(model.rowLower[r] - 1e-9));
  }
  return { m, n, fee, cap, demand, required, cost, totalDemand: demand.reduce((s, d) => s + d, 0), fewestVendors, integral, numCols: model.numCols, open: map.open, supply: map.supply };
}

/** The smallest total an award can have given a proven lower bound: rounded up when every total is whole. */
export function roundedBound(data: SoleData, bound: number): number {
  return data.integral ? Math.ceil(bound - 1e-6 * Math.max(1, Math.abs(bound))) : bound;
}

// Knapsacks are solved exactly by dynamic programming over capacity (weights and capacity
// divided by the demands' greatest common divisor) while items × capacity stays below this;
// beyond it, or with fractional demands, the Dantzig bound (items by value per unit, the last
// one fractional) is used instead: never below the knapsack's optimum, so L(u) stays a valid bound.
const DP_LIMIT = 4_000_000;

function gcd(a: number, b: number): number {
  while (b) [a, b] = [b, a % b];
  return a;
}

/** The best value of one vendor's knapsack and the regions it takes (`take`, 1 per region taken). */
export function knapsack(values: Float64Array, weights: Float64Array, items: number[], capacity: number, take: Uint8Array, exactWanted = true): { value: number; exact: boolean } {
  for (const j of items) take[j] = 0;
  let total = 0;
  let weight = 0;
  for (const j of items) { total += values[j]; weight += weights[j]; }
  if (weight <= capacity + 1e-9) {
    for (const j of items) take[j] = 1;
    return { value: total, exact: true };
  }
  const allWhole = exactWanted && items.every((j) => Number.isInteger(weights[j])) && Number.isFinite(capacity);
  if (allWhole) {
    let g = 0;
    for (const j of items) g = gcd(g, weights[j]);
    const cap = Math.floor(capacity / g + 1e-9);
    if (items.length * (cap + 1) <= DP_LIMIT) {
      // best[w]: best value with total weight at most w; keep[k * (cap + 1) + w]: item k taken there.
      const best = new Float64Array(cap + 1);
      const keep = new Uint8Array(items.length * (cap + 1));
      items.forEach((j, k) => {
        const w = weights[j] / g;
        const v = values[j];
        for (let c = cap; c >= w; c--) {
          const withIt = best[c - w] + v;
          if (withIt > best[c]) { best[c] = withIt; keep[k * (cap + 1) + c] = 1; }
        }
      });
      for (let k = items.length - 1, c = cap; k >= 0; k--) {
        if (keep[k * (cap + 1) + c]) { take[items[k]] = 1; c -= weights[items[k]] / g; }
      }
      return { value: best[cap], exact: true };
    }
  }
  const order = [...items].sort((a, b) => values[b] / weights[b] - values[a] / weights[a]);
  let left = capacity;
  let value = 0;
  for (const j of order) {
    if (weights[j] <= left) { take[j] = 1; left -= weights[j]; value += values[j]; }
    else { value += (values[j] * left) / weights[j]; left = 0; break; }
  }
  return { value, exact: false };
}

interface Completion { value: number; open: [number, number][]; exact: boolean }

/**
 * The cheapest set of further vendors (`worth` ≥ 0 each) whose capacities reach `need`: exact by
 * dynamic programming over capacity (a covering knapsack, capacities divided by their greatest
 * common divisor) when capacities are whole and small enough, else its LP (cheapest per unit of
 * capacity first, the last one fractional), which is never above it.
 */
function coverCompletion(rest: number[], worth: Float64Array, cap: Float64Array, need: number): Completion {
  if (need <= 1e-9) return { value: 0, open: [], exact: true };
  const whole = rest.every((i) => Number.isInteger(cap[i]));
  let g = 0;
  if (whole) for (const i of rest) g = gcd(g, cap[i]);
  const target = g > 0 ? Math.ceil(need / g - 1e-9) : 0;
  if (whole && g > 0 && rest.length * (target + 1) <= DP_LIMIT) {
    // f[c]: cheapest worth of vendors whose capacities reach at least c (in units of g).
    const f = new Float64Array(target + 1).fill(Infinity);
    f[0] = 0;
    const keep = new Uint8Array(rest.length * (target + 1));
    rest.forEach((i, k) => {
      const w = cap[i] / g;
      for (let c = target; c >= 1; c--) {
        const withIt = f[Math.max(0, c - w)] + worth[i];
        if (withIt < f[c]) { f[c] = withIt; keep[k * (target + 1) + c] = 1; }
      }
    });
    if (f[target] === Infinity) return { value: Infinity, open: [], exact: true };
    const open: [number, number][] = [];
    for (let k = rest.length - 1, c = target; k >= 0 && c > 0; k--) {
      if (keep[k * (target + 1) + c]) { open.push([rest[k], 1]); c = Math.max(0, c - cap[rest[k]] / g); }
    }
    return { value: f[target], open, exact: true };
  }
  return coverLp(rest, worth, cap, need);
}

/** The LP of the covering knapsack: cheapest per unit of capacity first, the last vendor fractional (never above the exact cover). */
function coverLp(rest: number[], worth: Float64Array, cap: Float64Array, need: number): Completion {
  if (need <= 1e-9) return { value: 0, open: [], exact: true };
  const order = [...rest].sort((a, b) => worth[a] / cap[a] - worth[b] / cap[b]);
  const open: [number, number][] = [];
  let value = 0;
  let left = need;
  for (const i of order) {
    if (left <= 1e-9) break;
    const share = Math.min(1, left / cap[i]);
    open.push([i, share]);
    value += share * worth[i];
    left -= share * cap[i];
  }
  return { value: left > 1e-9 ? Infinity : value, open, exact: false };
}

/** The cheapest `count` further vendors (each `worth` ≥ 0): exact. */
function countCompletion(rest: number[], worth: Float64Array, count: number): Completion {
  if (count <= 0) return { value: 0, open: [], exact: true };
  const order = [...rest].sort((a, b) => worth[a] - worth[b]).slice(0, count);
  if (order.length < count) return { value: Infinity, open: [], exact: true };
  return { value: order.reduce((s, i) => s + worth[i], 0), open: order.map((i) => [i, 1]), exact: true };
}

export interface RelaxedSolution {
  /** L(u), a lower bound on every award's total. */
  bound: number;
  /** y_i of the relaxed solution (1, 0, or a fraction for the one vendor the capacity cover splits). */
  open: Float64Array;
  /** Region j's vendors in the relaxed solution, as take flags per vendor: taken[i * n + j]. */
  taken: Uint8Array;
  /** Every knapsack was solved exactly. */
  exact: boolean;
  /** Per vendor, its fee less its knapsack's value at u (negative: it pays for itself; Infinity: cannot be awarded). */
  worth: Float64Array;
}

/**
 * Solves the relaxed problem at multipliers u. With `exactKnapsacks` false every knapsack takes
 * its Dantzig bound (its LP) instead of the dynamic programme: a weaker bound, the LP's at best,
 * but a tenth of the time or less at 80 × 400 — the subgradient method's first steps use it.
 */
export function relaxed(data: SoleData, u: Float64Array, exactKnapsacks = true): RelaxedSolution {
  const { m, n, fee, cap, demand, cost, required } = data;
  const values = new Float64Array(n);
  const take = new Uint8Array(n);
  const taken = new Uint8Array(m * n);
  const worth = new Float64Array(m);
  const open = new Float64Array(m);
  let exact = true;
  let bound = 0;
  for (let j = 0; j < n; j++) bound += u[j];
  for (let i = 0; i < m; i++) {
    if (!(cap[i] > 0)) { worth[i] = Infinity; continue; }
    const items: number[] = [];
    for (let j = 0; j < n; j++) {
      const v = u[j] - cost[i * n + j];
      if (v > 0) { values[j] = v; items.push(j); }
    }
    const k = knapsack(values, demand, items, cap[i], take, exactKnapsacks);
    exact &&= k.exact;
    worth[i] = fee[i] - k.value;
    for (const j of items) taken[i * n + j] = take[j];
  }
  // Choose the vendors: every vendor that pays for itself or is required, then the others the
  // aggregate capacity row or the fewest-vendors row still asks for. Both rows hold for every
  // award, but they are met one at a time here: the cheaper completion of the two is a relaxation
  // of meeting both, so the dearer of the two is still a lower bound (and its vendors the solution).
  let count = 0;
  let covered = 0;
  for (let i = 0; i < m; i++) {
    if (worth[i] === Infinity) continue;
    if (required[i] || worth[i] < 0) { open[i] = 1; bound += worth[i]; covered += cap[i]; count++; }
  }
  const rest: number[] = [];
  for (let i = 0; i < m; i++) if (!open[i] && worth[i] !== Infinity) rest.push(i);
  const cover = coverCompletion(rest, worth, cap, data.totalDemand - covered);
  const cardinality = countCompletion(rest, worth, data.fewestVendors - count);
  const completion = cover.value >= cardinality.value ? cover : cardinality;
  exact &&= completion.exact;
  bound += completion.value;
  for (const [i, share] of completion.open) open[i] = share;
  return { bound, open, taken, exact, worth };
}

/**
 * Repairs a relaxed solution into an award (the Lagrangian heuristic): the vendors it opens, each
 * region to the vendor that took it at the lowest price and still has room, the others in order
 * of regret (the dearer the second choice, the earlier) to the cheapest open vendor with room,
 * then the local search of `improve` (shift, swap, close a vendor, open a vendor).
 * Returns the model's column vector and its total, or null when the open vendors cannot cover.
 */
export function repair(data: SoleData, relaxedSolution: RelaxedSolution): { x: Float64Array; objective: number; owner: Int32Array } | null {
  const { m, n, cost, cap, demand } = data;
  const isOpen = Array.from(relaxedSolution.open, (v) => v > 1e-9);
  const residual = Float64Array.from(cap, (c, i) => (isOpen[i] ? c : 0));
  const owner = new Int32Array(n).fill(-1);
  const fits = (i: number, j: number) => residual[i] + 1e-9 >= demand[j] && cost[i * n + j] < Infinity;
  // Regions the relaxation gave to an open vendor, largest first, each to its cheapest such vendor with room.
  const byDemand = Array.from({ length: n }, (_, j) => j).sort((a, b) => demand[b] - demand[a]);
  for (const j of byDemand) {
    let pick = -1;
    for (let i = 0; i < m; i++) {
      if (isOpen[i] && relaxedSolution.taken[i * n + j] && fits(i, j) && (pick < 0 || cost[i * n + j] < cost[pick * n + j])) pick = i;
    }
    if (pick >= 0) { owner[j] = pick; residual[pick] -= demand[j]; }
  }
  for (;;) {
    // The unassigned region whose best and second-best open vendors with room differ most goes first.
    let next = -1;
    let nextVendor = -1;
    let nextRegret = -Infinity;
    for (let j = 0; j < n; j++) {
      if (owner[j] >= 0) continue;
      let first = -1;
      let second = Infinity;
      for (let i = 0; i < m; i++) {
        if (!isOpen[i] || !fits(i, j)) continue;
        const c = cost[i * n + j];
        if (first < 0 || c < cost[first * n + j]) { if (first >= 0) second = cost[first * n + j]; first = i; }
        else if (c < second) second = c;
      }
      if (first < 0) return null;
      const regret = second - cost[first * n + j];
      if (regret > nextRegret) { next = j; nextVendor = first; nextRegret = regret; }
    }
    if (next < 0) break;
    owner[next] = nextVendor;
    residual[nextVendor] -= demand[next];
  }
  // Then the local search (shift, swap, close a vendor, open a vendor).
  return awardOf(data, improve(data, owner));
}

/** The award that gives region j to vendor owner[j]: its column vector and total (fees of the vendors that serve, and the required ones). */
export function awardOf(data: SoleData, owner: Int32Array): { x: Float64Array; objective: number; owner: Int32Array } {
  const x = new Float64Array(data.numCols);
  for (let j = 0; j < data.n; j++) {
    x[data.supply[owner[j]][j]] = 1;
    if (data.open[owner[j]] >= 0) x[data.open[owner[j]]] = 1;
  }
  for (let i = 0; i < data.m; i++) if (data.required[i] && data.open[i] >= 0) x[data.open[i]] = 1;
  return { x, objective: totalOf(data, owner), owner };
}

/** The total of the award that gives region j to owner[j]: the fees of the vendors that serve (and of the required ones), plus the prices. */
export function totalOf(data: SoleData, owner: Int32Array): number {
  const { m, n, cost, fee, required, open } = data;
  const serves = new Uint8Array(m);
  let total = 0;
  for (let j = 0; j < n; j++) { serves[owner[j]] = 1; total += cost[owner[j] * n + j]; }
  for (let i = 0; i < m; i++) if ((serves[i] || required[i]) && open[i] >= 0) total += fee[i];
  return total;
}

// Passes of the local search over all moves; each pass that gains nothing ends it sooner.
const MAX_PASSES = 50;
// Shift chains look at this many of each region's cheapest vendors.
const NEAR = 6;
const nearCache = new WeakMap<SoleData, Int32Array>();

/** Each region's NEAR cheapest vendors that can take it, cheapest first (−1 past the last): at [j * NEAR + p]. */
function nearestVendors(data: SoleData): Int32Array {
  let near = nearCache.get(data);
  if (near) return near;
  const { m, n, cost } = data;
  near = new Int32Array(n * NEAR).fill(-1);
  const order = Array.from({ length: m }, (_, i) => i);
  for (let j = 0; j < n; j++) {
    order.sort((a, b) => cost[a * n + j] - cost[b * n + j]);
    for (let p = 0; p < NEAR && p < m && cost[order[p] * n + j] < Infinity; p++) near[j * NEAR + p] = order[p];
  }
  nearCache.set(data, near);
  return near;
}

/**
 * Local search on a sole award given as one vendor per region (every region assigned, within
 * the capacities): moves that lower the total, first-improvement for shifts and swaps,
 * best-improvement for closing and opening a vendor, until none gains:
 *  - shift: one region to another vendor with room (opening it pays its fee, emptying one saves it);
 *  - swap: two regions of two vendors exchanged, when both still fit;
 *  - close a vendor: all its regions to the cheapest other serving vendors with room, its fee saved;
 *  - open a vendor: the regions it is cheaper for, most saving first, as far as its capacity goes.
 * Only the capacities, the bids and the required vendors are kept here: the caller checks the
 * award against every row of the model (satisfiesRows) before it publishes it. Returns a new owner array.
 */
export function improve(data: SoleData, start: Int32Array): Int32Array {
  const { m, n, cost, cap, demand, fee, required } = data;
  const owner = Int32Array.from(start);
  const load = new Float64Array(m);
  const count = new Int32Array(m);
  for (let j = 0; j < n; j++) { load[owner[j]] += demand[j]; count[owner[j]]++; }
  const room = (i: number, extra: number) => load[i] + extra <= cap[i] + 1e-9;
  const eps = 1e-9;
  const move = (j: number, to: number) => {
    const from = owner[j];
    load[from] -= demand[j]; count[from]--;
    load[to] += demand[j]; count[to]++;
    owner[j] = to;
  };
  // Fee paid when vendor i gains its first region / saved when it loses its last.
  const opening = (i: number) => (count[i] === 0 && !required[i] ? fee[i] : 0);
  const closing = (i: number) => (count[i] === 1 && !required[i] ? fee[i] : 0);
  for (let pass = 0; pass < MAX_PASSES; pass++) {
    let gained = false;
    for (let j = 0; j < n; j++) {
      const a = owner[j];
      let best = -1;
      let bestDelta = -eps;
      for (let i = 0; i < m; i++) {
        if (i === a || !(cost[i * n + j] < Infinity) || !room(i, demand[j])) continue;
        const delta = cost[i * n + j] - cost[a * n + j] + opening(i) - closing(a);
        if (delta < bestDelta) { bestDelta = delta; best = i; }
      }
      if (best >= 0) { move(j, best); gained = true; }
    }
    for (let j = 0; j < n; j++) {
      for (let k = j + 1; k < n; k++) {
        const a = owner[j];
        const b = owner[k];
        if (a === b) continue;
        const delta = cost[a * n + k] + cost[b * n + j] - cost[a * n + j] - cost[b * n + k];
        if (!(delta < -eps)) continue;
        if (!room(a, demand[k] - demand[j]) || !room(b, demand[j] - demand[k])) continue;
        move(j, b); move(k, a);
        gained = true;
      }
    }
    if (gained) continue;
    // Shift chains: region j to vendor b, which has no room for it, once b's region k moves on to
    // a third vendor c (or to j's vendor): among each region's NEAR cheapest vendors only.
    const near = nearestVendors(data);
    const regionsOf: number[][] = Array.from({ length: m }, () => []);
    for (let j = 0; j < n; j++) regionsOf[owner[j]].push(j);
    const relist = (j: number, from: number, to: number) => {
      const list = regionsOf[from];
      list.splice(list.indexOf(j), 1);
      regionsOf[to].push(j);
    };
    for (let j = 0; j < n; j++) {
      const a = owner[j];
      for (let p = 0; p < NEAR; p++) {
        const b = near[j * NEAR + p];
        if (b < 0 || b === a || count[b] === 0 || room(b, demand[j])) continue;
        const first = cost[b * n + j] - cost[a * n + j];
        if (first >= 0) break;
        const need = load[b] + demand[j] - cap[b];
        let done = false;
        for (const k of regionsOf[b]) {
          if (demand[k] + 1e-9 < need) continue;
          for (let q = 0; q < NEAR; q++) {
            const c = near[k * NEAR + q];
            if (c < 0 || c === b || (count[c] === 0 && c !== a)) continue;
            const fits = c === a ? load[a] - demand[j] + demand[k] <= cap[a] + 1e-9 : room(c, demand[k]);
            if (!fits) continue;
            const delta = first + cost[c * n + k] - cost[b * n + k] - (c !== a ? closing(a) : 0);
            if (delta < -eps) {
              move(k, c); relist(k, b, c);
              move(j, b); relist(j, a, b);
              gained = true;
              done = true;
              break;
            }
          }
          if (done) break;
        }
        if (done) break;
      }
    }
    if (gained) continue;
    // Close one vendor: the best such move, if any gains.
    let close: { vendor: number; to: [number, number][]; delta: number } | null = null;
    const extra = new Float64Array(m);
    for (let a = 0; a < m; a++) {
      if (count[a] === 0 || required[a]) continue;
      extra.fill(0);
      const regions: number[] = [];
      for (let j = 0; j < n; j++) if (owner[j] === a) regions.push(j);
      regions.sort((p, q) => demand[q] - demand[p]);
      let delta = -fee[a];
      const to: [number, number][] = [];
      for (const j of regions) {
        let pick = -1;
        for (let i = 0; i < m; i++) {
          if (i === a || count[i] === 0 || !(cost[i * n + j] < Infinity) || !room(i, extra[i] + demand[j])) continue;
          if (pick < 0 || cost[i * n + j] < cost[pick * n + j]) pick = i;
        }
        if (pick < 0) { delta = Infinity; break; }
        extra[pick] += demand[j];
        delta += cost[pick * n + j] - cost[a * n + j];
        to.push([j, pick]);
      }
      if (delta < -eps && (!close || delta < close.delta)) close = { vendor: a, to, delta };
    }
    if (close) {
      for (const [j, i] of close.to) move(j, i);
      continue;
    }
    // Open one vendor: the best such move, if any gains (the fees of vendors it empties are saved too).
    let open: { to: number[]; vendor: number; delta: number } | null = null;
    for (let i = 0; i < m; i++) {
      if (count[i] > 0 || !(cap[i] > 0)) continue;
      const gains: [number, number][] = [];
      for (let j = 0; j < n; j++) {
        const saving = cost[owner[j] * n + j] - cost[i * n + j];
        if (saving > eps) gains.push([j, saving]);
      }
      gains.sort((p, q) => q[1] - p[1]);
      let used = 0;
      let delta = required[i] ? 0 : fee[i];
      const to: number[] = [];
      const left = Int32Array.from(count);
      for (const [j, saving] of gains) {
        if (used + demand[j] > cap[i] + 1e-9) continue;
        used += demand[j];
        delta -= saving;
        if (--left[owner[j]] === 0 && !required[owner[j]]) delta -= fee[owner[j]];
        to.push(j);
      }
      if (delta < -eps && (!open || delta < open.delta)) open = { to, vendor: i, delta };
    }
    if (!open) break;
    for (const j of open.to) move(j, open.vendor);
  }
  return owner;
}

export interface SubgradientOptions {
  /** Starting multipliers (the LP's row duals of the assignment rows), else the cheapest price of each region. */
  start?: Float64Array | null;
  /** An award's total: the target of the step rule (Held, Wolfe & Crowder). */
  upper: number;
  /** At most this many iterations (tests count iterations, never time). */
  iterations: number;
  /** Called with every repaired award; may return a lower total found since (another run's), which becomes the step's target. */
  onAward?: (award: { x: Float64Array; objective: number }) => number | void;
  /** Stops the iterations early when it returns true (a deadline). */
  stop?: () => boolean;
  /**
   * First steps on the knapsacks' LPs (`relaxed` with exactKnapsacks false), much cheaper, until
   * the step size λ falls below LP_STEPS_UNTIL; then on the exact knapsacks from where they left
   * the multipliers, λ starting again at EXACT_LAMBDA.
   */
  lpFirst?: boolean;
}

const LP_STEPS_UNTIL = 0.05;
const EXACT_LAMBDA = 0.5;

export interface SubgradientResult {
  bound: number;
  multipliers: Float64Array;
  iterations: number;
  /** The cheapest repaired award, or null. */
  best: { x: Float64Array; objective: number } | null;
}

/**
 * The subgradient method: u ← u + t·s with s_j = 1 − Σ_i y_i z_ij (the assignment rows' slack)
 * and t = λ (U − L(u)) / ‖s‖², λ from 2, halved after 20 iterations without a better bound
 * (Held, Wolfe & Crowder 1974; Fisher 1981). Stops when λ is below 1e-4, when the bound meets
 * the target (rounded up when every total is whole), or at the iteration limit.
 */
export function subgradient(data: SoleData, options: SubgradientOptions): SubgradientResult {
  const { m, n, cost } = data;
  let u = new Float64Array(n);
  if (options.start && options.start.length === n) u = Float64Array.from(options.start);
  else {
    for (let j = 0; j < n; j++) {
      let low = Infinity;
      for (let i = 0; i < m; i++) low = Math.min(low, cost[i * n + j]);
      u[j] = Number.isFinite(low) ? low : 0;
    }
  }
  let upper = options.upper;
  let bestBound = -Infinity;
  let bestU = Float64Array.from(u);
  let best: SubgradientResult['best'] = null;
  let lambda = 2;
  let idle = 0;
  let k = 0;
  let exact = !options.lpFirst;
  const s = new Float64Array(n);
  for (; k < options.iterations && (lambda > 1e-4 || !exact); k++) {
    if (options.stop?.()) break;
    if (!exact && lambda < LP_STEPS_UNTIL) {
      exact = true;
      lambda = EXACT_LAMBDA;
      idle = 0;
      u = Float64Array.from(bestU);
    }
    const r = relaxed(data, u, exact);
    if (bestBound === -Infinity || r.bound > bestBound + 1e-9 * Math.max(1, Math.abs(bestBound))) { bestBound = r.bound; bestU = Float64Array.from(u); idle = 0; }
    else if (++idle >= 20) { lambda /= 2; idle = 0; }
    if (k % 5 === 0 || idle === 0) {
      const award = repair(data, r);
      if (award && (!best || award.objective < best.objective - 1e-9)) {
        best = { x: award.x, objective: award.objective };
        upper = Math.min(upper, award.objective);
      }
      if (award) {
        const theirs = options.onAward?.(award);
        if (typeof theirs === 'number') upper = Math.min(upper, theirs);
      }
    }
    if (roundedBound(data, bestBound) >= upper - 1e-6 * Math.max(1, Math.abs(upper))) { k++; break; }
    let norm = 0;
    for (let j = 0; j < n; j++) {
      let cover = 0;
      for (let i = 0; i < m; i++) if (r.open[i] > 0 && r.taken[i * n + j]) cover += r.open[i];
      s[j] = 1 - cover;
      norm += s[j] * s[j];
    }
    if (norm < 1e-12) { k++; break; }
    // Step toward the target; when no award is known yet, toward 5 % above the bound (a common choice).
    const target = Number.isFinite(upper) ? upper : r.bound + 0.05 * Math.max(1, Math.abs(r.bound));
    const t = (lambda * Math.max(target - r.bound, 1e-6 * Math.max(1, Math.abs(target)))) / norm;
    for (let j = 0; j < n; j++) u[j] += t * s[j];
  }
  return { bound: bestBound, multipliers: bestU, iterations: k, best };
}

/**
 * An upper limit of V(c), the best value of a vendor's knapsack at every capacity c up to its own:
 * the dynamic programme's table when it is small enough, else the Dantzig bound at c (items by
 * value per unit, the last one fractional). Both are at least the knapsack's optimum at c.
 */
function knapsackProfile(values: Float64Array, weights: Float64Array, items: number[], capacity: number): (c: number) => number {
  if (items.length === 0) return () => 0;
  const allWhole = items.every((j) => Number.isInteger(weights[j])) && Number.isFinite(capacity);
  if (allWhole) {
    let g = 0;
    for (const j of items) g = gcd(g, weights[j]);
    const top = Math.floor(capacity / g + 1e-9);
    if (items.length * (top + 1) <= DP_LIMIT) {
      const best = new Float64Array(top + 1);
      for (const j of items) {
        const w = weights[j] / g;
        for (let c = top; c >= w; c--) best[c] = Math.max(best[c], best[c - w] + values[j]);
      }
      return (c) => (c < -1e-9 ? -Infinity : best[Math.min(top, Math.floor(c / g + 1e-9))]);
    }
  }
  const order = [...items].sort((a, b) => values[b] / weights[b] - values[a] / weights[a]);
  const weightSum = new Float64Array(order.length + 1);
  const valueSum = new Float64Array(order.length + 1);
  order.forEach((j, k) => { weightSum[k + 1] = weightSum[k] + weights[j]; valueSum[k + 1] = valueSum[k] + values[j]; });
  return (c) => {
    if (c < -1e-9) return -Infinity;
    let lo = 0;
    let hi = order.length;
    // The largest k with weightSum[k] ≤ c.
    while (lo < hi) { const mid = (lo + hi + 1) >> 1; if (weightSum[mid] <= c + 1e-9) lo = mid; else hi = mid - 1; }
    if (lo === order.length) return valueSum[lo];
    const j = order[lo];
    return valueSum[lo] + (values[j] * (c - weightSum[lo])) / weights[j];
  };
}

export interface LagrangianFixing {
  /** 1 where z_ij (at [i * n + j]) can be 1 in no award of total ≤ `upper`: fixed at 0. */
  pairs: Uint8Array;
  /** 1 where vendor i is open in no award of total ≤ `upper`: closed (all its pairs fixed too). */
  vendors: Uint8Array;
  fixedPairs: number;
  closedVendors: number;
}

/**
 * Reduced-cost fixing from the Lagrangian relaxation at multipliers u (MODEL.md, "Lagrangian
 * bound"): a lower bound on every award that opens vendor i, and on every award that gives region
 * j to vendor i, computed from the same relaxation with that choice forced; where that bound is
 * above `upper` (every total whole: rounded up, then above), the choice is ruled out. Every award
 * of total at most `upper` survives (the one of total `upper` too), so the optimum is never lost
 * when `upper` is an award's total.
 *  - Forcing z_ij = 1 opens i and puts j in its knapsack: i then contributes at least
 *    F_i − (u_j − c_ij) − V_i(K̄_i − d_j), with V_i(·) the upper limit of `knapsackProfile`.
 *  - The other vendors contribute at least the vendors that pay for themselves (and the required
 *    ones), plus the LP of the covering knapsack for the capacity still needed and the cheapest
 *    further vendors the fewest-vendors row still asks for, whichever is dearer.
 */
export function lagrangianFixing(data: SoleData, u: Float64Array, upper: number): LagrangianFixing {
  const { m, n, fee, cap, demand, cost, required } = data;
  const pairs = new Uint8Array(m * n);
  const vendors = new Uint8Array(m);
  const values = new Float64Array(n);
  const take = new Uint8Array(n);
  const worth = new Float64Array(m);
  const profiles: ((c: number) => number)[] = [];
  let sumU = 0;
  for (let j = 0; j < n; j++) sumU += u[j];
  for (let i = 0; i < m; i++) {
    profiles.push(() => 0);
    if (!(cap[i] > 0)) { worth[i] = Infinity; continue; }
    const items: number[] = [];
    for (let j = 0; j < n; j++) {
      const v = u[j] - cost[i * n + j];
      if (v > 0) { values[j] = v; items.push(j); }
    }
    worth[i] = fee[i] - knapsack(values, demand, items, cap[i], take).value;
    profiles[i] = knapsackProfile(values, demand, items, cap[i]);
  }
  // S0: the vendors every relaxed solution opens (required, or paying for themselves).
  let base = sumU;
  let covered = 0;
  let count = 0;
  const inBase = new Uint8Array(m);
  for (let i = 0; i < m; i++) {
    if (worth[i] === Infinity) continue;
    if (required[i] || worth[i] < 0) { inBase[i] = 1; base += worth[i]; covered += cap[i]; count++; }
  }
  const rest: number[] = [];
  for (let i = 0; i < m; i++) if (!inBase[i] && worth[i] !== Infinity) rest.push(i);
  const completion = (others: number[], need: number, more: number) => Math.max(coverLp(others, worth, cap, need).value, countCompletion(others, worth, more).value);
  const plain = completion(rest, data.totalDemand - covered, data.fewestVendors - count);
  const above = (bound: number) => {
    const b = roundedBound(data, bound);
    return b > upper + (data.integral ? 0.5 : 1e-6 * Math.max(1, Math.abs(upper)));
  };
  let fixedPairs = 0;
  let closedVendors = 0;
  for (let i = 0; i < m; i++) {
    if (worth[i] === Infinity) continue;
    // The bound with vendor i open, without its own contribution.
    let others: number;
    if (inBase[i]) others = base - worth[i] + plain;
    else others = base + completion(rest.filter((k) => k !== i), data.totalDemand - covered - cap[i], data.fewestVendors - count - 1);
    if (!required[i] && above(others + worth[i])) {
      vendors[i] = 1;
      closedVendors++;
      for (let j = 0; j < n; j++) if (cost[i * n + j] < Infinity) { pairs[i * n + j] = 1; fixedPairs++; }
      continue;
    }
    for (let j = 0; j < n; j++) {
      if (!(cost[i * n + j] < Infinity)) continue;
      const forced = fee[i] - (u[j] - cost[i * n + j]) - profiles[i](cap[i] - demand[j]);
      if (above(others + forced)) { pairs[i * n + j] = 1; fixedPairs++; }
    }
  }
  return { pairs, vendors, fixedPairs, closedVendors };
}
