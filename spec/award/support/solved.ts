import type { AwardProblem, AwardResult } from '../../../shared/award';
import { solveAward } from '../../../server/award/index';
import { validateProblem } from '../../../server/award/instance';
import { verifyAward } from '../../../server/award/verify';

/**
 * Solves a hand-worked problem and checks what every award must satisfy: proven optimal, accepted
 * by the independent verifier (server/award/verify.ts), objective = fees + variable cost.
 */
export async function solved(problem: AwardProblem): Promise<AwardResult> {
  const result = await solveAward(problem);
  expect(result.status).toBe('optimal');
  expect(verifyAward(validateProblem(problem), result.awards, result.objective!)).toEqual([]);
  expect(result.objective).toBeCloseTo(result.fixedCost! + result.variableCost!, 6);
  return result;
}

/** The award as vendor → region → quantity, for a compact expected value. */
export const quantities = (r: AwardResult) =>
  Object.fromEntries(r.awards.map((a) => [a.vendor, Object.fromEntries(a.lines.map((l) => [l.region, l.quantity]))]));
