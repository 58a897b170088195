import type { AwardProblem } from '../../../shared/award';
import { buildModel } from '../../../server/award/build-model';
import { toInstance, validateProblem } from '../../../server/award/instance';
import { soleData, type SoleData } from '../../../server/award/lagrangian';
import { largeSoleProblem } from './problems';

/** largeSoleProblem with tight capacities (1.2–1.5 × an even share of the forecast): where the LP is weak. */
export function tightSoleProblem(vendors: number, regions: number, seed: number): AwardProblem {
  const base = largeSoleProblem(vendors, regions, seed);
  const total = base.regions.reduce((s, r) => s + r.demand, 0);
  return { ...base, vendors: base.vendors.map((v, i) => ({ ...v, capacity: Math.ceil((total / vendors) * (1.2 + 0.1 * (i % 4))) })) };
}

/** The built model of a sole award problem and its SoleData (lagrangian.ts). */
export function dataOf(problem: AwardProblem): { data: SoleData; model: ReturnType<typeof buildModel>['model'] } {
  const { model, map } = buildModel(toInstance(validateProblem(problem)));
  const data = soleData(model, map);
  expect(data).not.toBeNull();
  return { data: data!, model };
}

/** Vendor of each region in a sole award's column vector (−1 where none). */
export function owners(data: SoleData, x: ArrayLike<number>): Int32Array {
  const owner = new Int32Array(data.n).fill(-1);
  for (let i = 0; i < data.m; i++) for (let j = 0; j < data.n; j++) if (data.supply[i][j] >= 0 && x[data.supply[i][j]] > 0.5) owner[j] = i;
  return owner;
}

/** True when every vendor's regions fit its effective capacity and every region goes to a vendor that bid it. */
export function withinCapacities(data: SoleData, owner: Int32Array): boolean {
  const load = new Float64Array(data.m);
  for (let j = 0; j < data.n; j++) {
    if (owner[j] < 0 || !(data.cost[owner[j] * data.n + j] < Infinity)) return false;
    load[owner[j]] += data.demand[j];
  }
  return load.every((l, i) => l <= data.cap[i] + 1e-9);
}
