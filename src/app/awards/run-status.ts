import { FINISHED_RUN_STATUSES, type RecommendationStatus, type RunStatus } from '@shared/evaluation';

/** Run states in words; the badge beside them is never the only signal. */
export const RUN_STATUS_LABELS: Record<RunStatus, string> = {
  queued: 'Waiting to start',
  solving: 'Solving',
  optimal: 'Best possible award (proven)',
  feasible: 'Best award found in the time limit',
  infeasible: 'No award meets the rules',
  failed: 'Solve failed',
  cancelled: 'Cancelled',
};

export const RECOMMENDATION_STATUS_LABELS: Record<RecommendationStatus, string> = {
  recommended: 'Awaiting compliance decision',
  approved: 'Approved',
  returned: 'Returned to the buyer',
};

export function isFinished(status: RunStatus): boolean {
  return FINISHED_RUN_STATUSES.includes(status);
}

/** A run whose award can be read, compared, checked and recommended. */
export function hasAward(status: RunStatus): boolean {
  return status === 'optimal' || status === 'feasible';
}
