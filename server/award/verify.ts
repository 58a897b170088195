import { isWholeMultiple, type ValidAwardProblem, type VendorAward } from '../../shared/award';

/**
 * Checks an award against every rule of the problem, straight from the problem file. Written
 * apart from build-model.ts on purpose: it shares no code or data structure with the model, so a
 * mistake in the model shows up here as a broken rule instead of being repeated.
 * Returns the violations in words; an empty list means the award meets every rule.
 */
export function verifyAward(problem: ValidAwardProblem, awards: VendorAward[], objective?: number): string[] {
  const problems: string[] = [];
  const total = problem.regions.reduce((s, r) => s + r.demand, 0);
  const tol = (x: number) => 1e-6 * Math.max(1, Math.abs(x));
  const vendors = new Map(problem.vendors.map((v) => [v.id, v]));
  const regionDemand = new Map(problem.regions.map((r) => [r.id, r.demand]));
  const rules = problem.rules;
  const supplied = new Map<string, number>();
  const suppliers = new Map<string, number>();
  const seen = new Set<string>();
  let cost = 0;

  for (const a of awards) {
    const v = vendors.get(a.vendor);
    if (!v) { problems.push(`award to unknown vendor ${a.vendor}`); continue; }
    if (seen.has(a.vendor)) problems.push(`vendor ${a.vendor} is listed twice`);
    seen.add(a.vendor);
    if (Math.abs(a.fixedFee - v.fixedFee) > tol(v.fixedFee)) problems.push(`vendor ${a.vendor}: fee ${a.fixedFee} charged, bid ${v.fixedFee}`);
    let quantity = 0;
    let value = v.fixedFee;
    for (const line of a.lines) {
      const price = v.prices[line.region];
      const demand = regionDemand.get(line.region);
      if (demand === undefined) { problems.push(`vendor ${a.vendor}: unknown region ${line.region}`); continue; }
      if (price === undefined) problems.push(`vendor ${a.vendor} supplies region ${line.region}, which it did not bid`);
      else if (Math.abs(line.unitPrice - price) > tol(price)) problems.push(`vendor ${a.vendor}, region ${line.region}: price ${line.unitPrice}, bid ${price}`);
      if (line.quantity < -tol(demand)) problems.push(`vendor ${a.vendor}, region ${line.region}: negative quantity`);
      if (rules.awardIncrement !== undefined && line.quantity !== 0 && !isWholeMultiple(line.quantity, rules.awardIncrement)) {
        problems.push(`vendor ${a.vendor}, region ${line.region}: quantity ${line.quantity} is not a whole multiple of the award increment ${rules.awardIncrement}`);
      }
      if (Math.abs(line.cost - (price ?? line.unitPrice) * line.quantity) > tol(line.cost)) problems.push(`vendor ${a.vendor}, region ${line.region}: cost is not price × quantity`);
      if (rules.maxRegionShare !== undefined && line.quantity > rules.maxRegionShare * demand + tol(demand)) {
        problems.push(`vendor ${a.vendor} carries ${line.quantity} of region ${line.region}, above the maximum region share`);
      }
      quantity += line.quantity;
      value += line.cost;
      supplied.set(line.region, (supplied.get(line.region) ?? 0) + line.quantity);
      if (line.quantity > tol(demand)) suppliers.set(line.region, (suppliers.get(line.region) ?? 0) + 1);
    }
    cost += value;
    if (v.capacity !== null && quantity > v.capacity + tol(v.capacity)) problems.push(`vendor ${a.vendor} supplies ${quantity}, above its cap ${v.capacity}`);
    const minAward = rules.minAwardQuantity ?? Math.min(1, total);
    if (quantity < minAward - tol(minAward)) problems.push(`vendor ${a.vendor} is awarded ${quantity}, below the minimum award quantity ${minAward}`);
    if (rules.maxVendorShare !== undefined && quantity > rules.maxVendorShare * total + tol(total)) problems.push(`vendor ${a.vendor} carries ${quantity}, above the maximum vendor share`);
    if (rules.exclude.includes(a.vendor)) problems.push(`excluded vendor ${a.vendor} is awarded`);
    if (Math.abs(a.quantity - quantity) > tol(quantity) || Math.abs(a.value - value) > tol(value)) problems.push(`vendor ${a.vendor}: totals do not add up`);
  }

  for (const r of problem.regions) {
    const got = supplied.get(r.id) ?? 0;
    if (Math.abs(got - r.demand) > tol(r.demand)) problems.push(`region ${r.id}: ${got} supplied, forecast ${r.demand}`);
    const sole = rules.sourcing === 'sole' || rules.soleRegions.includes(r.id);
    if (sole && (suppliers.get(r.id) ?? 0) > 1) problems.push(`sole-award region ${r.id} has ${suppliers.get(r.id)} vendors`);
  }
  if (rules.maxVendors !== undefined && awards.length > rules.maxVendors) problems.push(`${awards.length} vendors awarded, at most ${rules.maxVendors} allowed`);
  if (rules.minVendors !== undefined && awards.length < rules.minVendors) problems.push(`${awards.length} vendors awarded, at least ${rules.minVendors} required`);
  for (const id of rules.require) if (!seen.has(id)) problems.push(`required vendor ${id} is not awarded`);
  if (rules.smeShare !== undefined) {
    const sme = awards.filter((a) => vendors.get(a.vendor)?.sme).reduce((s, a) => s + a.quantity, 0);
    if (sme < rules.smeShare * total - tol(total)) problems.push(`SME vendors carry ${sme}, below the SME share`);
  }
  if (objective !== undefined && Math.abs(objective - cost) > tol(cost)) problems.push(`objective ${objective} is not the sum of the awards ${cost}`);
  return problems;
}
