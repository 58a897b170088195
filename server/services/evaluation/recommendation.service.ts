import type { EntityManager } from '@mikro-orm/postgresql';
import { basisDifference } from '@shared/award-basis';
import type { RecommendationView } from '@shared/evaluation';
import { Recommendation, Run, Tender, type User } from '../../entities';
import { AppError, ConflictError, NotFoundError, ValidationError } from '../../http/errors';
import { audit } from '../audit.service';
import { solvedRules } from '../queries/evaluation.queries';
import { assertBidsValid, assertRecommendable } from '../compliance.service';
import { lockTender } from '../tender-access';
import { transition } from '../transition';
import { evaluableTender, FROZEN } from './scenarios.service';
import { statusesBefore } from '@shared/tenders';
import { standstillEnd } from '../standstill';
import { notifyRecommendationDecided, notifyRecommendationWaiting } from '../notifications/decisions';
import type { NotifyDeps } from '../notifications/notify';

const AWAITING = 'A recommendation is awaiting compliance; it must be approved or returned first.';

function view(r: Recommendation): RecommendationView {
  return {
    id: r.id, tenderId: r.tender.id, runId: r.run.id, status: r.status, justification: r.justification,
    recommendedBy: { id: r.recommendedBy.id, name: r.recommendedBy.name }, recommendedAt: r.createdAt.toISOString(),
    decidedBy: r.decidedBy ? { id: r.decidedBy.id, name: r.decidedBy.name } : null,
    decidedAt: r.decidedAt?.toISOString() ?? null, comment: r.comment ?? null,
  };
}

/** The latest recommendation and every earlier round (returned, then recommended again), newest first. */
export async function currentRecommendation(em: EntityManager, user: User, tenderId: string): Promise<{ recommendation: RecommendationView | null; history: RecommendationView[] }> {
  await evaluableTender(em, user, tenderId);
  const rounds = await em.find(Recommendation, { tender: tenderId }, { populate: ['recommendedBy', 'decidedBy', 'run', 'tender'], orderBy: { createdAt: 'desc', id: 'desc' } });
  const [latest, ...earlier] = rounds.map(view);
  return { recommendation: latest ?? null, history: earlier };
}

/**
 * Only a run of the published award basis can be recommended: a what-if (any rule other than the
 * basis, or vendors left out or required by the buyer) answers 409 naming the first rule that
 * differs. Both the scenario's rules and the rules the run actually solved are checked (a scenario
 * may have been edited since); of the solved rules, `exclude` is left out of the comparison, as the
 * compliance check's exclusions of bids are not the buyer's choice of rules.
 */
async function refuseWhatIf(em: EntityManager, tender: Tender, run: Run): Promise<void> {
  const rules = await solvedRules(em, run.id);
  const solved = rules ? { ...rules, exclude: [] } : undefined;
  const difference = basisDifference(run.scenario.rules, tender.awardBasis) ?? (solved ? basisDifference(solved, tender.awardBasis) : null);
  if (difference) {
    throw new ConflictError(
      `This scenario is a what-if: ${difference.message}. Only a run of the published award basis can be recommended.`,
      [{ field: difference.field, message: `This rule differs from the published award basis: ${difference.message}.` }],
    );
  }
}

/** The buyer recommends one run's award, with a justification; compliance is told it waits. */
export async function recommend(em: EntityManager, user: User, tenderId: string, input: { runId: string; justification: string }, notify: NotifyDeps): Promise<RecommendationView> {
  const tender = await evaluableTender(em, user, tenderId, true);
  const run = await em.findOne(Run, { id: input.runId, tender }, { populate: ['scenario'] });
  if (!run) throw new ValidationError([{ field: 'runId', message: 'This run does not belong to the tender.' }]);
  if (run.parent) throw new ValidationError([{ field: 'runId', message: 'A resilience re-solve cannot be recommended.' }]);
  if (run.status !== 'optimal' && run.status !== 'feasible') throw new ValidationError([{ field: 'runId', message: 'Only a run with an award can be recommended.' }]);
  await refuseWhatIf(em, tender, run);
  const id = await em.transactional(async (tx) => {
    // Under the tender's lock: of two recommendations racing, the second sees the first (409).
    await lockTender(tx, user, tenderId, ['closed'], FROZEN);
    if (await tx.count(Recommendation, { tender: tenderId, status: 'recommended' })) throw new ConflictError(AWAITING);
    // Under the lock, so that no compliance decision slips in between the check and the record.
    await assertRecommendable(tx, tenderId, run);
    const r = tx.create(Recommendation, { tender, run, justification: input.justification, recommendedBy: user });
    await tx.flush();
    await audit(tx, {
      tenderId, actor: user, action: 'recommendation.made', subject: `run ${run.id}`,
      detail: { justification: input.justification, objective: run.result?.objective ?? null }, after: { runId: run.id, inputDigest: run.inputDigest, result: run.result },
    });
    await notifyRecommendationWaiting(tx, notify, { tenderId, recommendationId: r.id, recommendedBy: user.name, justification: input.justification });
    return r.id;
  });
  return view((await em.fork().findOne(Recommendation, { id }, { populate: ['recommendedBy', 'decidedBy', 'run', 'tender'] }))!);
}

/**
 * Compliance approves (the tender becomes `awarded`: scenarios and bids are frozen) or returns the
 * recommendation. Never the person who recommended it (four-eyes rule). The buyer is told.
 */
export async function decide(em: EntityManager, user: User, tenderId: string, decision: 'approved' | 'returned', comment: string, notify: NotifyDeps): Promise<RecommendationView> {
  await evaluableTender(em, user, tenderId, true);
  const id = await em.transactional(async (tx) => {
    // Under the tender's lock: approve and return (or two approvals) racing run one after the other;
    // the second finds the recommendation decided, or the tender awarded, and gets 409.
    await lockTender(tx, user, tenderId, ['closed'], 'This tender is awarded: its recommendation was approved and can no longer be decided.');
    const r = await tx.findOne(Recommendation, { tender: tenderId }, { populate: ['recommendedBy', 'decidedBy', 'run'], orderBy: { createdAt: 'desc' } });
    if (!r) throw new NotFoundError('A recommendation awaiting a decision');
    if (r.status !== 'recommended') {
      throw new ConflictError(`No recommendation is awaiting a decision: the latest was ${r.status} by ${r.decidedBy?.name ?? 'someone'} at ${r.decidedAt?.toISOString() ?? 'an earlier time'}.`);
    }
    if (r.recommendedBy.id === user.id) {
      throw new AppError(403, 'Not allowed', 'You made this recommendation: someone else must approve or return it (four-eyes rule).');
    }
    if (decision === 'approved') await assertBidsValid(tx, tenderId, r.run);
    const decidedAt = new Date();
    await transition(tx, Recommendation, r.id, ['recommended'], { status: decision, decidedBy: user.id, decidedAt, comment: comment || null }, 'This recommendation has already been decided.');
    let standstill: ReturnType<typeof standstillEnd> | null = null;
    if (decision === 'approved') {
      // The standstill end is fixed here, once: every letter of the tender carries this stored end.
      const tender = await tx.findOneOrFail(Tender, { id: tenderId });
      standstill = standstillEnd({
        approvedAt: decidedAt, days: tender.standstillDays, timeZone: tender.timeZone, country: tender.buyingBody?.country, closureDays: tender.closureDays,
      });
      await transition(tx, Tender, tenderId, statusesBefore('awarded'), { status: 'awarded', standstillEndsAt: standstill.endsAt }, 'The tender is no longer open to an award decision.');
    }
    await audit(tx, {
      tenderId, actor: user, action: `recommendation.${decision}`, subject: `recommendation ${r.id}`,
      detail: { comment, ...(standstill ? { standstillEndsAt: standstill.endsAt.toISOString(), standstillLastDay: standstill.lastDay, standstillSkipped: standstill.skipped } : {}) },
      before: { status: 'recommended' }, after: { status: decision },
    });
    await notifyRecommendationDecided(tx, notify, { tenderId, recommendationId: r.id, decision, decidedBy: user.name, comment });
    return r.id;
  });
  return view((await em.fork().findOne(Recommendation, { id }, { populate: ['recommendedBy', 'decidedBy', 'run', 'tender'] }))!);
}
