import type { EntityManager } from '@mikro-orm/postgresql';
import { formatInZone } from '@shared/time-zone';
import { renderMail } from '../../mail/templates';
import { activeComplianceOfficers, decisionTenderRow } from '../queries/notifications.queries';
import { notifyOnce, type NotifyDeps } from './notify';

const recommendationLink = (deps: NotifyDeps, tenderId: string) => `${deps.publicUrl}/tenders/${tenderId}/evaluation/recommendation`;
const settingsLink = (deps: NotifyDeps) => `${deps.publicUrl}/settings`;

/**
 * A recommendation was made: every active compliance officer is told it waits (in the
 * recommendation's transaction). Nothing of the bids' figures: only who recommended and why.
 */
export async function notifyRecommendationWaiting(
  tx: EntityManager, deps: NotifyDeps, input: { tenderId: string; recommendationId: string; recommendedBy: string; justification: string },
): Promise<void> {
  const t = await decisionTenderRow(tx, input.tenderId);
  const officers = await activeComplianceOfficers(tx);
  await notifyOnce(tx, deps.boss, {
    kind: 'recommendation-waiting', subjectId: input.recommendationId, tenderId: input.tenderId, recipients: officers,
    render: (r) => renderMail('recommendation-waiting', `Recommendation awaiting your decision: ${t.reference}`, {
      name: r.name, reference: t.reference, title: t.title, recommendedBy: input.recommendedBy, justification: input.justification,
      link: recommendationLink(deps, input.tenderId), settingsLink: settingsLink(deps),
    }),
  });
}

/** Compliance approved or returned the recommendation: the tender's buyer is told (in the decision's transaction). */
export async function notifyRecommendationDecided(
  tx: EntityManager, deps: NotifyDeps, input: { tenderId: string; recommendationId: string; decision: 'approved' | 'returned'; decidedBy: string; comment: string },
): Promise<void> {
  const t = await decisionTenderRow(tx, input.tenderId);
  if (!t.buyer_active) return;
  const approved = input.decision === 'approved';
  await notifyOnce(tx, deps.boss, {
    kind: approved ? 'recommendation-approved' : 'recommendation-returned', subjectId: input.recommendationId, tenderId: input.tenderId,
    recipients: [{ id: t.buyer_id, email: t.buyer_email, name: t.buyer_name }],
    render: (r) => renderMail('recommendation-decided', `Recommendation ${input.decision}: ${t.reference}`, {
      name: r.name, reference: t.reference, title: t.title, approved, decidedBy: input.decidedBy, comment: input.comment,
      standstillEndsAt: t.standstill_ends_at ? formatInZone(new Date(t.standstill_ends_at).toISOString(), t.time_zone) : '',
      link: recommendationLink(deps, input.tenderId), settingsLink: settingsLink(deps),
    }),
  });
}
