import { effectiveCapacity, inIncrements, regionLimit, type AwardInstance } from './instance';

/**
 * Cheap checks, before any solve, that each prove on their own that no award can meet the rules.
 * Every message names the region, vendor or rule concerned and the quantities in conflict. An
 * empty list does not mean the problem is feasible: only the solver can tell that.
 */
export function diagnose(problemInstance: AwardInstance): string[] {
  // With an award increment the checks count whole increments, as the model does (a cap of 80 t
  // with increments of 25 t supplies at most 75 t); the messages give quantities in the problem's unit.
  const inst = inIncrements(problemInstance);
  const unitSize = inst.unitSize ?? 1;
  const out: string[] = [];
  const q = (x: number) => `${(x * unitSize).toLocaleString('en-GB', { maximumFractionDigits: 3 })} ${inst.unit}`;
  const inWhole = inst.unitSize === undefined ? '' : ` (in whole award increments of ${q(1)})`;
  const pct = (x: number) => `${(x * 100).toLocaleString('en-GB', { maximumFractionDigits: 2 })} %`;
  const regionLabel = (j: number) => {
    const r = inst.regions[j];
    return r.name !== r.id ? `region ${r.id} (${r.name})` : `region ${r.id}`;
  };
  const vendorLabel = (i: number) => {
    const v = inst.vendors[i];
    return v.name !== v.id ? `vendor ${v.id} (${v.name})` : `vendor ${v.id}`;
  };
  const rules = inst.rules;
  const eligible = inst.vendors.map((v, i) => i).filter((i) => !inst.vendors[i].excluded);
  const caps = inst.vendors.map((_, i) => effectiveCapacity(inst, i));

  inst.vendors.forEach((v, i) => {
    if (v.required && v.excluded) out.push(`${vendorLabel(i)} is both required and excluded.`);
    if (v.required && v.prices.every((p) => p === null)) out.push(`${vendorLabel(i)} is required but bid no region.`);
    if (v.required && !v.excluded && caps[i] + 1e-9 < rules.minAwardQuantity) {
      out.push(`${vendorLabel(i)} is required but can supply at most ${q(caps[i])}${inWhole}, below the minimum award quantity ${q(problemInstance.rules.minAwardQuantity / unitSize)}.`);
    }
  });

  inst.regions.forEach((r, j) => {
    const bidders = eligible.filter((i) => inst.vendors[i].prices[j] !== null);
    const anyBid = inst.vendors.some((v) => v.prices[j] !== null);
    if (bidders.length === 0) {
      out.push(anyBid ? `${regionLabel(j)}: only excluded vendors bid it.` : `${regionLabel(j)}: no vendor bid it.`);
      return;
    }
    if (r.sole) {
      if (rules.maxRegionShare !== undefined && rules.maxRegionShare < 1) {
        out.push(`${regionLabel(j)} must be sole-awarded, but the maximum region share is ${pct(rules.maxRegionShare)}: one vendor cannot take the whole region.`);
        return;
      }
      const best = Math.max(...bidders.map((i) => caps[i]));
      if (best + 1e-9 < r.demand) {
        out.push(`sole-award ${regionLabel(j)} needs ${q(r.demand)} but no bidder there can supply more than ${q(best)}${inWhole}.`);
      }
    } else {
      const share = rules.maxRegionShare ?? 1;
      const reach = bidders.reduce((s, i) => s + Math.min(caps[i], regionLimit(inst, j)), 0);
      if (reach + 1e-9 < r.demand) {
        out.push(share < 1
          ? `${regionLabel(j)} needs ${q(r.demand)} but its ${bidders.length} bidder(s), each limited to ${pct(share)} of the region${inst.unitSize === undefined ? '' : ` (${q(regionLimit(inst, j))} in whole award increments of ${q(1)})`}, can supply only ${q(reach)}.`
          : `${regionLabel(j)} needs ${q(r.demand)} but its bidders can supply only ${q(reach)} together${inWhole}.`);
      }
    }
  });

  const totalCap = eligible.reduce((s, i) => s + caps[i], 0);
  if (totalCap + 1e-9 < inst.totalDemand) {
    const why = rules.maxVendorShare !== undefined ? ` (caps, regions bid and the ${pct(rules.maxVendorShare)} vendor share limit taken into account)` : '';
    out.push(`total capacity ${q(totalCap)}${inWhole} is below total forecast ${q(inst.totalDemand)}${why}.`);
  }

  const nRequired = inst.vendors.filter((v) => v.required).length;
  if (rules.maxVendors !== undefined) {
    if (nRequired > rules.maxVendors) out.push(`${nRequired} vendors are required but at most ${rules.maxVendors} may be awarded.`);
    const largest = eligible.map((i) => caps[i]).sort((a, b) => b - a).slice(0, rules.maxVendors);
    const sum = largest.reduce((s, c) => s + c, 0);
    if (totalCap + 1e-9 >= inst.totalDemand && sum + 1e-9 < inst.totalDemand) {
      out.push(`at most ${rules.maxVendors} vendor(s) may be awarded, but the ${rules.maxVendors} largest together can supply only ${q(sum)}${inWhole} of the total forecast ${q(inst.totalDemand)}.`);
    }
  }
  if (rules.minVendors !== undefined) {
    const possible = eligible.filter((i) => caps[i] + 1e-9 >= rules.minAwardQuantity && inst.vendors[i].prices.some((p) => p !== null));
    if (possible.length < rules.minVendors) {
      out.push(`at least ${rules.minVendors} vendors must be awarded, but only ${possible.length} eligible vendor(s) can receive an award.`);
    }
  }
  if (rules.smeShare !== undefined && rules.smeShare > 0) {
    const need = rules.smeShare * inst.totalDemand;
    const smeCap = eligible.filter((i) => inst.vendors[i].sme).reduce((s, i) => s + caps[i], 0);
    if (smeCap + 1e-9 < need) {
      out.push(`the SME share of ${pct(rules.smeShare)} needs ${q(need)} from SME vendors, but SME capacity is only ${q(smeCap)}${inWhole}.`);
    }
  }
  return out;
}

/** The message when the solver proves infeasibility that no cheap check explains. */
export const SOLVER_ONLY_INFEASIBLE =
  'No award meets all the rules together, although each cheap check passes on its own: the combination of rules (sole regions, vendor counts, shares, minimum award quantity, SME share) is too tight. Relax one rule at a time to find the one that binds.';

/** The same message for an instance: with an award increment, the increment is one of the rules named. */
export function solverOnlyInfeasible(inst: AwardInstance): string {
  if (inst.increment === undefined) return SOLVER_ONLY_INFEASIBLE;
  const increment = `${inst.increment.toLocaleString('en-GB', { maximumFractionDigits: 6 })} ${inst.unit}`;
  return SOLVER_ONLY_INFEASIBLE.replace('SME share)', `SME share, award increment of ${increment}: every quantity a whole multiple of it)`);
}
