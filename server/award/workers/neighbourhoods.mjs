// Neighbourhoods for the large neighbourhood search (workers/lns-worker.mjs): which columns of the
// award model to free around the current award, the rest staying fixed at the award's values.
// A neighbourhood is a set of vendors V (their award decision y_i is freed) and a set of regions R
// (who supplies them is freed, among V and the regions' current suppliers). R always holds every
// region V supplies now, so the sub-problem may close any vendor of V. Which vendors and regions
// go together is read from the bids: vendors whose prices rise and fall over the same regions
// compete for them, and regions priced alike by every vendor are served by the same vendors.

// Price profile of a vendor that did not bid a region, relative to the region's mean price: far
// from every bidder, so vendors are compared on the regions they both bid.
const NO_BID = 3;

/**
 * What the neighbourhoods need from the model, computed once: the columns of each vendor and
 * region (`structure` is build-model.ts's ModelMap: open[i], supply[i][j], -1 where absent).
 */
export function prepare(model, structure) {
  const { open, supply } = structure;
  const m = open.length;
  const n = supply[0]?.length ?? 0;
  // Normalised price of vendor i in region j: its column's cost over the mean of the region's
  // bidders (sole columns cost p·d, split ones p; within a region the scale is the same).
  const profile = Array.from({ length: m }, () => new Float64Array(n).fill(NO_BID));
  const cheapest = [];
  for (let j = 0; j < n; j++) {
    const bidders = [];
    let sum = 0;
    for (let i = 0; i < m; i++) {
      const c = supply[i][j];
      if (c < 0 || open[i] < 0) continue;
      bidders.push(i);
      sum += model.colCost[c];
    }
    const mean = bidders.length ? sum / bidders.length : 0;
    for (const i of bidders) profile[i][j] = mean > 0 ? model.colCost[supply[i][j]] / mean : 1;
    cheapest.push(bidders.sort((a, b) => profile[a][j] - profile[b][j]));
  }
  // Vendors nearest first, for each vendor (L1 distance of the price profiles).
  const vendors = [];
  for (let i = 0; i < m; i++) if (open[i] >= 0) vendors.push(i);
  const distance = (a, b) => { let s = 0; for (let j = 0; j < n; j++) s += Math.abs(profile[a][j] - profile[b][j]); return s; };
  const nearVendors = new Map(vendors.map((i) => [i, vendors.filter((k) => k !== i).map((k) => [k, distance(i, k)]).sort((p, q) => p[1] - q[1]).map((p) => p[0])]));
  return { model, open, supply, m, n, profile, cheapest, vendors, nearVendors };
}

/** Who supplies each region in award x, and which vendors are awarded. */
export function readAward(ctx, x) {
  const { open, supply, m, n } = ctx;
  const owners = Array.from({ length: n }, () => []);
  const served = Array.from({ length: m }, () => []);
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < n; j++) {
      const c = supply[i][j];
      if (c >= 0 && x[c] > 1e-7) { owners[j].push(i); served[i].push(j); }
    }
  }
  const awarded = ctx.vendors.filter((i) => x[open[i]] > 0.5);
  return { owners, served, awarded };
}

/** A pseudo-random generator (mulberry32) so that a run can be repeated from its seed. */
export function randomSource(seed) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * The columns freed by one neighbourhood around an award (read by readAward), as a mask over the model's columns.
 * Kinds: 'vendors' (a vendor, more often an awarded one, and the `size` − 1 vendors nearest to
 * it), 'random' (about `size` vendors drawn at random), 'regions' (a region and the `size` − 1
 * regions priced most like it, with their suppliers and cheapest bidders).
 */
export function neighbourhood(ctx, award, kind, size, random) {
  const { open, supply, vendors, cheapest, n } = ctx;
  const pick = (list) => list[Math.floor(random() * list.length)];
  const V = new Set();
  const R = new Set();
  if (kind === 'regions') {
    const seed = Math.floor(random() * n);
    const near = [];
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (const i of vendors) s += Math.abs(ctx.profile[i][j] - ctx.profile[i][seed]);
      near.push([j, s]);
    }
    near.sort((a, b) => a[1] - b[1]);
    for (const [j] of near.slice(0, size)) {
      R.add(j);
      for (const i of award.owners[j]) V.add(i);
      for (const i of cheapest[j].slice(0, 2)) V.add(i);
    }
  } else {
    const seed = kind === 'random' ? pick(vendors) : pick(random() < 0.7 && award.awarded.length ? award.awarded : vendors);
    V.add(seed);
    const pool = kind === 'random' ? vendors : ctx.nearVendors.get(seed);
    // Nearest vendors, with a little chance of skipping one, so repeated seeds differ.
    for (const k of pool) {
      if (V.size >= size) break;
      if (kind === 'random' ? random() < size / vendors.length : random() < 0.85) V.add(k);
    }
    for (const i of V) {
      for (const j of award.served[i]) R.add(j);
      // Regions where a vendor of V is among the two cheapest bidders: where it could take over.
      for (let j = 0; j < n; j++) if (cheapest[j][0] === i || cheapest[j][1] === i) R.add(j);
    }
  }
  // Regions a closed vendor of V would have to hand over must be free too.
  for (const i of V) for (const j of award.served[i]) R.add(j);
  const free = new Uint8Array(ctx.model.numCols);
  for (const i of V) free[open[i]] = 1;
  for (const j of R) {
    const suppliers = new Set([...V, ...award.owners[j]]);
    for (const i of suppliers) if (supply[i][j] >= 0) free[supply[i][j]] = 1;
  }
  return { free, vendors: V.size, regions: R.size };
}

/** True when x meets every bound and row of the model (tolerance 1e-7, relative to the row). */
export function satisfiesRows(model, x) {
  for (let c = 0; c < model.numCols; c++) {
    if (x[c] < model.colLower[c] - 1e-9 || x[c] > model.colUpper[c] + 1e-7 * Math.max(1, model.colUpper[c])) return false;
    if (model.integer[c] && Math.abs(x[c] - Math.round(x[c])) > 1e-9) return false;
  }
  for (let r = 0; r < model.rowNames.length; r++) {
    let act = 0;
    let scale = 1;
    for (let k = model.rowStarts[r]; k < model.rowStarts[r + 1]; k++) {
      act += model.rowValue[k] * x[model.rowIndex[k]];
      scale = Math.max(scale, Math.abs(model.rowValue[k]));
    }
    if (act < model.rowLower[r] - 1e-7 * scale || act > model.rowUpper[r] + 1e-7 * scale) return false;
  }
  return true;
}
