import { effectiveCapacity, inIncrements, regionLimit, type AwardInstance } from './instance';
import { satisfiesRows } from './kernel';
import type { MipModel, ModelMap } from './model';

// The rule check lives in the kernel (one copy for every thread); exported here too for callers of the greedy award.
export { satisfiesRows };

/**
 * A fast greedy award used to seed the exact search (an incumbent lets branch and bound prune
 * from the first node). Close-vendor/open-vendor local search over the set of awarded vendors,
 * with a greedy assignment and shift/swap moves for the regions. Rule-agnostic on purpose: the
 * result is checked against every row of the model and dropped when it breaks any.
 */
export async function greedyIncumbent(problemInstance: AwardInstance, model: MipModel, map: ModelMap, budgetMs = 1000, signal?: AbortSignal): Promise<Float64Array | null> {
  // The model's own view: with an award increment, quantities in whole increments (build-model.ts).
  const inst = inIncrements(problemInstance);
  // It runs on the caller's thread: it yields to the event loop after every round of moves (a few
  // milliseconds each) and stops at a time budget, keeping the best award so far, or at once
  // (returning nothing) when the solve no longer needs it.
  const stopAt = performance.now() + budgetMs;
  const m = inst.vendors.length;
  const n = inst.regions.length;
  if (m === 0 || m * n > 200_000) return null;
  const caps = inst.vendors.map((_, i) => effectiveCapacity(inst, i));
  const usable = inst.vendors.map((_, i) => map.open[i] >= 0);
  const demand = inst.regions.map((r) => r.demand);
  // Bidders of each region, cheapest first (sorted once: assign() runs many times).
  const byPrice = inst.regions.map((_, j) => inst.vendors.map((_, i) => i).filter((i) => map.supply[i][j] >= 0)
    .sort((a, b) => inst.vendors[a].prices[j]! - inst.vendors[b].prices[j]!));
  const order = inst.regions.map((_, j) => j).sort((a, b) => demand[b] - demand[a]);

  // Quantities per vendor and region for a given set of awarded vendors, or null if it fails.
  function assign(open: boolean[], polish: boolean): { q: number[][]; cost: number } | null {
    const residual = caps.map((c, i) => (open[i] ? c : 0));
    const q = inst.vendors.map(() => new Array<number>(n).fill(0));
    const owner = new Array<number>(n).fill(-1);
    for (const j of order) {
      const bidders = byPrice[j].filter((i) => open[i]);
      if (inst.regions[j].sole) {
        const i = bidders.find((k) => residual[k] + 1e-9 >= demand[j]);
        if (i === undefined) return null;
        q[i][j] = demand[j];
        residual[i] -= demand[j];
        owner[j] = i;
      } else {
        let left = demand[j];
        for (const i of bidders) {
          // Whole increments stay whole: demand, residual caps and the region limit are integers then.
          const take = Math.min(left, residual[i], regionLimit(inst, j));
          if (take <= 0) continue;
          q[i][j] += take;
          residual[i] -= take;
          left -= take;
          if (left <= 1e-9) break;
        }
        if (left > 1e-9 * Math.max(1, demand[j])) return null;
      }
    }
    // Shift moves (sole regions): move a region to a cheaper awarded vendor with room.
    const price = (i: number, j: number) => inst.vendors[i].prices[j]! * demand[j];
    for (let pass = 0, improved = true; improved && pass < 20; pass++) {
      improved = false;
      for (let j = 0; j < n; j++) {
        const a = owner[j];
        if (a < 0) continue;
        let best = a;
        for (let i = 0; i < m; i++) {
          if (i !== a && open[i] && map.supply[i][j] >= 0 && residual[i] + 1e-9 >= demand[j] && price(i, j) < price(best, j) - 1e-9) best = i;
        }
        if (best !== a) {
          q[a][j] = 0; q[best][j] = demand[j];
          residual[a] += demand[j]; residual[best] -= demand[j];
          owner[j] = best;
          improved = true;
        }
      }
      if (!polish) continue;
      // Swap moves: exchange two regions between their vendors when both fit and it saves.
      for (let j = 0; j < n; j++) {
        for (let k = j + 1; k < n; k++) {
          const a = owner[j];
          const b = owner[k];
          if (a < 0 || b < 0 || a === b || map.supply[a][k] < 0 || map.supply[b][j] < 0) continue;
          const gain = price(a, j) + price(b, k) - price(a, k) - price(b, j);
          if (gain <= 1e-9) continue;
          if (residual[a] + demand[j] + 1e-9 < demand[k] || residual[b] + demand[k] + 1e-9 < demand[j]) continue;
          q[a][j] = 0; q[b][k] = 0; q[a][k] = demand[k]; q[b][j] = demand[j];
          residual[a] += demand[j] - demand[k]; residual[b] += demand[k] - demand[j];
          owner[j] = b; owner[k] = a;
          improved = true;
        }
      }
    }
    let cost = 0;
    for (let i = 0; i < m; i++) {
      let used = 0;
      for (let j = 0; j < n; j++) { used += q[i][j]; cost += q[i][j] * (inst.vendors[i].prices[j] ?? 0); }
      if (open[i] && used > 0) cost += inst.vendors[i].fee;
      else if (open[i] && used === 0 && !inst.vendors[i].required) open[i] = false;
    }
    return { q, cost };
  }

  let open = usable.slice();
  let best = assign(open.slice(), false);
  if (!best) return null;
  // Close (then open) vendors one at a time while the total cost falls.
  for (let round = 0, improved = true; improved && round < 3 * m && performance.now() < stopAt; round++) {
    await new Promise((resolve) => setImmediate(resolve));
    if (signal?.aborted) return null;
    improved = false;
    let bestMove: { open: boolean[]; result: { q: number[][]; cost: number } } | null = null;
    for (let i = 0; i < m && performance.now() < stopAt; i++) {
      if (!usable[i] || inst.vendors[i].required) continue;
      const trial = open.slice();
      trial[i] = !trial[i];
      const r = assign(trial, false);
      if (r && r.cost < (bestMove?.result.cost ?? best.cost) - 1e-9) bestMove = { open: trial, result: r };
    }
    if (bestMove) { open = bestMove.open; best = bestMove.result; improved = true; }
  }
  await new Promise((resolve) => setImmediate(resolve));
  if (signal?.aborted) return null;
  const final = (performance.now() < stopAt ? assign(open.slice(), true) : null) ?? best;

  const x = new Float64Array(model.numCols);
  for (let i = 0; i < m; i++) {
    let used = 0;
    for (let j = 0; j < n; j++) {
      const c = map.supply[i][j];
      if (c < 0 || final.q[i][j] <= 0) continue;
      x[c] = map.soleColumn[j] ? 1 : final.q[i][j];
      used += final.q[i][j];
    }
    if (map.open[i] >= 0 && (used > 0 || inst.vendors[i].required)) x[map.open[i]] = 1;
  }
  return satisfiesRows(model, x) ? x : null;
}
