// Neighbourhoods for the large neighbourhood search (workers/lns-worker.ts): which columns of the
// award model to free around the current award, the rest staying fixed at the award's values.
// A neighbourhood is a set of vendors V (their award decision y_i is freed) and a set of regions R
// (who supplies them is freed, among V and the regions' current suppliers). R always holds every
// region V supplies now, so the sub-problem may close any vendor of V. Which vendors and regions
// go together is read from the bids: vendors whose prices rise and fall over the same regions
// compete for them, and regions priced alike by every vendor are served by the same vendors.
import type { MipModel, ModelMap } from '../model';

// Price profile of a vendor that did not bid a region, relative to the region's mean price: far
// from every bidder, so vendors are compared on the regions they both bid.
const NO_BID = 3;

/** Where the vendors' and regions' columns are: build-model.ts's ModelMap without the region kinds. */
export type ModelStructure = Pick<ModelMap, 'open' | 'supply'>;

export interface NeighbourhoodContext {
  model: MipModel;
  open: number[];
  supply: number[][];
  m: number;
  n: number;
  profile: Float64Array[];
  cheapest: number[][];
  vendors: number[];
  nearVendors: Map<number, number[]>;
}

export interface AwardView { owners: number[][]; served: number[][]; awarded: number[] }

export type NeighbourhoodKind = 'vendors' | 'regions' | 'random';

/**
 * What the neighbourhoods need from the model, computed once: the columns of each vendor and
 * region (open[i], supply[i][j], -1 where absent).
 */
export function prepare(model: MipModel, structure: ModelStructure): NeighbourhoodContext {
  const { open, supply } = structure;
  const m = open.length;
  const n = supply[0]?.length ?? 0;
  // Normalised price of vendor i in region j: its column's cost over the mean of the region's
  // bidders (sole columns cost p·d, split ones p; within a region the scale is the same).
  const profile = Array.from({ length: m }, () => new Float64Array(n).fill(NO_BID));
  const cheapest: number[][] = [];
  for (let j = 0; j < n; j++) {
    const bidders: number[] = [];
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
  const vendors: number[] = [];
  for (let i = 0; i < m; i++) if (open[i] >= 0) vendors.push(i);
  const distance = (a: number, b: number) => { let s = 0; for (let j = 0; j < n; j++) s += Math.abs(profile[a][j] - profile[b][j]); return s; };
  const nearVendors = new Map(vendors.map((i) => [i, vendors.filter((k) => k !== i).map((k): [number, number] => [k, distance(i, k)]).sort((p, q) => p[1] - q[1]).map((p) => p[0])]));
  return { model, open, supply, m, n, profile, cheapest, vendors, nearVendors };
}

/** Who supplies each region in award x, and which vendors are awarded. */
export function readAward(ctx: NeighbourhoodContext, x: ArrayLike<number>): AwardView {
  const { open, supply, m, n } = ctx;
  const owners = Array.from({ length: n }, (): number[] => []);
  const served = Array.from({ length: m }, (): number[] => []);
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < n; j++) {
      const c = supply[i][j];
      if (c >= 0 && x[c] > 1e-7) { owners[j].push(i); served[i].push(j); }
    }
  }
  const awarded = ctx.vendors.filter((i) => x[open[i]] > 0.5);
  return { owners, served, awarded };
}

/**
 * The columns freed by one neighbourhood around an award (read by readAward), as a mask over the model's columns.
 * Kinds: 'vendors' (a vendor, more often an awarded one, and the `size` − 1 vendors nearest to
 * it), 'random' (about `size` vendors drawn at random), 'regions' (a region and the `size` − 1
 * regions priced most like it, with their suppliers and cheapest bidders).
 */
export function neighbourhood(ctx: NeighbourhoodContext, award: AwardView, kind: NeighbourhoodKind, size: number, random: () => number): { free: Uint8Array; vendors: number; regions: number } {
  const { open, supply, vendors, cheapest, n } = ctx;
  const pick = (list: number[]) => list[Math.floor(random() * list.length)];
  const V = new Set<number>();
  const R = new Set<number>();
  if (kind === 'regions') {
    const seed = Math.floor(random() * n);
    const near: [number, number][] = [];
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
    const pool = kind === 'random' ? vendors : ctx.nearVendors.get(seed) ?? [];
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
