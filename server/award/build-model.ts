import { effectiveCapacity, inIncrements, regionLimit, type AwardInstance } from './instance';
import { ModelBuilder, type MipModel, type ModelMap } from './model';

/**
 * Builds the award model of DESIGN.md ("The award model"), see MODEL.md for the mathematics:
 *   min Σ F_i y_i + Σ p_ij q_ij
 *   Σ_i q_ij = d_j;  Σ_j q_ij ≤ K_i y_i (always present: no supply without the fee);
 *   q_ij ≤ min(d_j, K_i) y_i (strong linking); sole regions use q_ij = d_j z_ij, Σ_i z_ij = 1.
 * K_i here is the effective capacity (cap, vendor-share rule, reach of the regions bid): a
 * tighter but equivalent constant, so the LP bound is stronger and nothing feasible is cut off.
 * With an award increment the model is built in whole increments (`inIncrements`): every q_ij is
 * an integer count of increments and every quantity constant is counted in increments.
 */
export function buildModel(problemInstance: AwardInstance): { model: MipModel; map: ModelMap } {
  const inst = inIncrements(problemInstance);
  const wholeIncrements = inst.unitSize !== undefined;
  const b = new ModelBuilder();
  const INF = Number.POSITIVE_INFINITY;
  const rules = inst.rules;
  const regionShare = rules.maxRegionShare ?? 1;
  const caps = inst.vendors.map((_, i) => effectiveCapacity(inst, i));
  const usable = inst.vendors.map((v, i) => !v.excluded && caps[i] > 0 && v.prices.some((p) => p !== null));

  const open = inst.vendors.map((v, i) =>
    usable[i] ? b.addCol(`y_${i}`, v.fee, v.required ? 1 : 0, 1, true) : -1);
  const soleColumn = inst.regions.map((r) => r.sole);
  const supply = inst.vendors.map((v, i) =>
    inst.regions.map((r, j) => {
      const p = v.prices[j];
      if (!usable[i] || p === null) return -1;
      if (r.sole) return caps[i] + 1e-9 >= r.demand && regionShare >= 1 ? b.addCol(`z_${i}_${j}`, p * r.demand, 0, 1, true) : -1;
      const upper = Math.min(regionLimit(inst, j), caps[i]);
      return upper > 0 ? b.addCol(`q_${i}_${j}`, p, 0, upper, wholeIncrements) : -1;
    }));
  // Quantity coefficient of a supply column: 1 for q_ij, d_j for z_ij.
  const qty = (j: number) => (soleColumn[j] ? inst.regions[j].demand : 1);

  inst.regions.forEach((r, j) => {
    const cols: number[] = [];
    const vals: number[] = [];
    inst.vendors.forEach((_, i) => {
      if (supply[i][j] >= 0) { cols.push(supply[i][j]); vals.push(1); }
    });
    const rhs = r.sole ? 1 : r.demand;
    b.addRow(`demand_${j}`, cols, vals, rhs, rhs);
  });

  inst.vendors.forEach((v, i) => {
    if (open[i] < 0) return;
    const cols: number[] = [];
    const vals: number[] = [];
    inst.regions.forEach((_, j) => {
      if (supply[i][j] >= 0) { cols.push(supply[i][j]); vals.push(qty(j)); }
    });
    // Capacity-and-fee row: Σ_j q_ij − K_i y_i ≤ 0. Never dropped, even when the cap cannot bind.
    b.addRow(`capacity_${i}`, [...cols, open[i]], [...vals, -caps[i]], -INF, 0);
    if (rules.minAwardQuantity > 0) {
      b.addRow(`min_award_${i}`, [...cols, open[i]], [...vals, -rules.minAwardQuantity], 0, INF);
    }
    // Strong linking: q_ij ≤ min(d_j, K_i) y_i, and z_ij ≤ y_i for sole regions.
    inst.regions.forEach((r, j) => {
      const c = supply[i][j];
      if (c < 0) return;
      const u = r.sole ? 1 : Math.min(regionLimit(inst, j), caps[i]);
      b.addRow(`link_${i}_${j}`, [c, open[i]], [1, -u], -INF, 0);
    });
  });

  const openCols = open.filter((c) => c >= 0);
  if (rules.maxVendors !== undefined) b.addRow('max_vendors', openCols, openCols.map(() => 1), -INF, rules.maxVendors);
  if (rules.minVendors !== undefined && rules.minVendors > 0) b.addRow('min_vendors', openCols, openCols.map(() => 1), rules.minVendors, INF);
  if (rules.smeShare !== undefined && rules.smeShare > 0) {
    const cols: number[] = [];
    const vals: number[] = [];
    inst.vendors.forEach((v, i) => {
      if (!v.sme) return;
      inst.regions.forEach((_, j) => {
        if (supply[i][j] >= 0) { cols.push(supply[i][j]); vals.push(qty(j)); }
      });
    });
    b.addRow('sme_share', cols, vals, rules.smeShare * inst.totalDemand, INF);
  }
  // Aggregate capacity row Σ_i K_i y_i ≥ Σ_j d_j: implied by the capacity rows, but written out
  // it lets both solvers derive knapsack cover cuts on the y_i (classic for capacitated location).
  const openCaps = inst.vendors.map((_, i) => caps[i]).filter((_, i) => open[i] >= 0);
  b.addRow('total_capacity', openCols, openCaps, inst.totalDemand, INF);
  // Its rounded consequence Σ_i y_i ≥ p, p the fewest vendors whose largest capacities together
  // reach the forecast: every award opens at least p vendors. The LP, left to itself, opens a few
  // large vendors fractionally; this row closes much of that gap on tight-capacity tenders.
  const fewest = fewestVendorsToCover(openCaps, inst.totalDemand);
  if (fewest > 1 && fewest > (rules.minVendors ?? 0)) b.addRow('fewest_vendors', openCols, openCols.map(() => 1), fewest, INF);

  return { model: b.build(), map: { open, supply, soleColumn } };
}

/** The fewest capacities (largest first) that together reach `total`; more than all of them when they cannot. */
export function fewestVendorsToCover(caps: number[], total: number): number {
  const sorted = [...caps].sort((a, b) => b - a);
  let sum = 0;
  for (let k = 0; k < sorted.length; k++) {
    sum += sorted[k];
    // The same relative tolerance as the capacity checks: a forecast met to rounding counts as met.
    if (sum + 1e-9 * Math.max(1, total) >= total) return k + 1;
  }
  return sorted.length + 1;
}
