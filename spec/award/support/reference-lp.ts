import type { AwardProblem } from '../../../shared/award';

/**
 * An independent statement of the award model in CPLEX LP text, for HiGHS (the `highs` package)
 * used directly as a reference solver. Written from DESIGN.md alone, sharing no code with
 * server/award: plain big-M linking (q_ij ≤ cap_i · y_i), sole regions as q_ij = d_j · z_ij.
 * An award increment u is stated the plain way, in the problem's own units: q_ij = u · n_ij with
 * n_ij a general integer (the engine instead counts in increments and rounds caps itself).
 * Names: y_<v>, q_<v>_<r>, z_<v>_<r>, n_<v>_<r> with vendor and region indices.
 */
export function referenceLp(p: AwardProblem): string {
  const total = p.regions.reduce((s, r) => s + r.demand, 0);
  const rules = p.rules ?? {};
  const sole = (id: string) => rules.sourcing === 'sole' || (rules.soleRegions ?? []).includes(id);
  const excluded = new Set(rules.exclude ?? []);
  const obj: string[] = [];
  const rows: string[] = [];
  const bounds: string[] = [];
  const binaries: string[] = [];
  const generals: string[] = [];
  const bids = p.vendors.map((v) => p.regions.map((r) => (v.prices as Record<string, number | undefined>)[r.id]));
  const num = (x: number) => (Number.isInteger(x) ? String(x) : x.toPrecision(17));
  // Quantity term of vendor i in region j: q or d·z.
  const qTerm = (i: number, j: number) => (sole(p.regions[j].id) ? `${num(p.regions[j].demand)} z_${i}_${j}` : `q_${i}_${j}`);
  p.vendors.forEach((v, i) => {
    binaries.push(`y_${i}`);
    obj.push(`${num(v.fixedFee ?? 0)} y_${i}`);
    if (excluded.has(v.id)) rows.push(`excl_${i}: y_${i} = 0`);
    if ((rules.require ?? []).includes(v.id)) rows.push(`req_${i}: y_${i} = 1`);
    const cap = v.capacity ?? total;
    const terms: string[] = [];
    p.regions.forEach((r, j) => {
      const price = bids[i][j];
      if (price === undefined) return;
      if (sole(r.id)) {
        binaries.push(`z_${i}_${j}`);
        obj.push(`${num(price * r.demand)} z_${i}_${j}`);
        rows.push(`lz_${i}_${j}: z_${i}_${j} - y_${i} <= 0`);
        if (rules.maxRegionShare !== undefined && rules.maxRegionShare < 1) bounds.push(`z_${i}_${j} = 0`);
      } else {
        obj.push(`${num(price)} q_${i}_${j}`);
        rows.push(`lq_${i}_${j}: q_${i}_${j} - ${num(cap)} y_${i} <= 0`);
        if (rules.maxRegionShare !== undefined) bounds.push(`q_${i}_${j} <= ${num(rules.maxRegionShare * r.demand)}`);
        if (rules.awardIncrement !== undefined) {
          rows.push(`inc_${i}_${j}: q_${i}_${j} - ${num(rules.awardIncrement)} n_${i}_${j} = 0`);
          generals.push(`n_${i}_${j}`);
        }
      }
      terms.push(qTerm(i, j));
    });
    const sum = terms.length ? terms.join(' + ') : '0 y_' + i;
    rows.push(`cap_${i}: ${sum} - ${num(cap)} y_${i} <= 0`);
    const minAward = rules.minAwardQuantity ?? Math.min(1, total);
    rows.push(`min_${i}: ${sum} - ${num(minAward)} y_${i} >= 0`);
    if (rules.maxVendorShare !== undefined) rows.push(`share_${i}: ${sum} <= ${num(rules.maxVendorShare * total)}`);
  });
  p.regions.forEach((r, j) => {
    const terms = p.vendors.map((_, i) => (bids[i][j] === undefined ? null : sole(r.id) ? `z_${i}_${j}` : `q_${i}_${j}`)).filter((t): t is string => t !== null);
    if (terms.length === 0) rows.push(`dem_${j}: 0 y_0 = 1`);
    else rows.push(sole(r.id) ? `dem_${j}: ${terms.join(' + ')} = 1` : `dem_${j}: ${terms.join(' + ')} = ${num(r.demand)}`);
  });
  const ys = p.vendors.map((_, i) => `y_${i}`).join(' + ');
  if (rules.maxVendors !== undefined) rows.push(`maxv: ${ys} <= ${rules.maxVendors}`);
  if (rules.minVendors !== undefined) rows.push(`minv: ${ys} >= ${rules.minVendors}`);
  if (rules.smeShare !== undefined) {
    const terms: string[] = [];
    p.vendors.forEach((v, i) => { if (v.sme) p.regions.forEach((_, j) => { if (bids[i][j] !== undefined) terms.push(qTerm(i, j)); }); });
    rows.push(`sme: ${terms.length ? terms.join(' + ') : '0 y_0'} >= ${num(rules.smeShare * total)}`);
  }
  return ['Minimize', ` cost: ${obj.join(' + ')}`, 'Subject To', ...rows.map((r) => ` ${r}`), 'Bounds', ...bounds.map((b) => ` ${b}`), 'Binaries', ` ${binaries.join(' ')}`, ...(generals.length ? ['General', ` ${generals.join(' ')}`] : []), 'End', ''].join('\n');
}
