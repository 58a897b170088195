import type { AwardProblem } from '../../../shared/award';
import { randomSource } from '../../../server/award/kernel';

/**
 * Small hand-solvable problems. Base: regions A and B (100 units each);
 *   V1 fee 50, no cap, A @1, B @3;  V2 fee 50, no cap, A @3, B @1;  V3 (SME) fee 10, cap 100, A @2, B @2.
 * Unconstrained optimum: V1 supplies A, V2 supplies B: fees 100 + 200 = 300.
 */
export function baseProblem(rules: NonNullable<AwardProblem['rules']> = {}): AwardProblem {
  return {
    currency: 'EUR',
    unit: 't',
    regions: [{ id: 'A', name: 'Ashford depot', demand: 100 }, { id: 'B', name: 'Brenley depot', demand: 100 }],
    vendors: [
      { id: 'V1', name: 'Northway Salt', fixedFee: 50, capacity: null, prices: { A: 1, B: 3 } },
      { id: 'V2', name: 'Eastmoor Minerals', fixedFee: 50, capacity: null, prices: { A: 3, B: 1 } },
      { id: 'V3', name: 'Little Fen Haulage', fixedFee: 10, capacity: 100, sme: true, prices: { A: 2, B: 2 } },
    ],
    rules,
    options: { timeLimitSeconds: 20 },
  };
}

/** The engine's seeded generator (mulberry32), so two runs price the same bids. */
export const prng = randomSource;

/** A random capacitated sole-award instance, hard enough to run into a time limit at 30 × 150. */
export function largeSoleProblem(vendors: number, regions: number, seed: number): AwardProblem {
  const rnd = prng(seed);
  const demand = Array.from({ length: regions }, () => 5 + Math.floor(rnd() * 30));
  const total = demand.reduce((s, d) => s + d, 0);
  const xs = Array.from({ length: vendors + regions }, () => [rnd(), rnd()]);
  return {
    regions: demand.map((d, j) => ({ id: `R${j}`, demand: d })),
    vendors: Array.from({ length: vendors }, (_, i) => ({
      id: `V${i}`,
      fixedFee: 400 + Math.floor(rnd() * 600),
      capacity: Math.ceil((total / vendors) * (2 + rnd() * 2)),
      prices: Object.fromEntries(demand.map((_, j) => {
        const [a, b] = xs[i];
        const [c, d] = xs[vendors + j];
        return [`R${j}`, 1 + Math.round(Math.hypot(a - c, b - d) * 100) / 10];
      })),
    })),
    rules: { sourcing: 'sole' },
  };
}
