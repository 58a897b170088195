import type { EntityManager } from '@mikro-orm/postgresql';
import { describeAwardBasis } from '@shared/award-basis';
import { awardStatusWords } from '@shared/award-wording';
import { EXCLUSION_GROUND_LABELS } from '@shared/compliance';
import type { RecommendationView } from '@shared/evaluation';
import { extraCostWords } from '@shared/explanation';
import { isSealed } from '@shared/tenders';
import type { User } from '../../entities';
import { AppError, ConflictError } from '../../http/errors';
import { auditTrail, verifyTrail } from '../audit.service';
import { bidsOf } from '../bids.service';
import { listContracts } from '../contracts.service';
import { explanationOf } from '../evaluation/explanation.service';
import { currentRecommendation } from '../evaluation/recommendation.service';
import { compareRuns, resilienceOf, runView } from '../evaluation/results.service';
import { listScenarios } from '../evaluation/scenarios.service';
import { sensitivityOf } from '../evaluation/sensitivity.service';
import { openingRecordOf } from '../opening-record.service';
import { listQuestions } from '../procedure.service';
import { findVisibleTender } from '../tender-access';
import { tenderView } from '../tenders.service';
import { formatMoney, percentText } from './report-words';

/**
 * Everything the evaluation report states, as plain data: the PDF and the workbook both write this
 * and nothing else. Each part comes from the service that serves it on screen (tabulation,
 * comparison, run, explanation, checks, recommendation, contracts, audit trail), never computed anew,
 * except the bids' totals at the forecast, which no service states per bid.
 */
export interface ReportContent {
  generatedAt: string;
  tender: {
    id: string; reference: string; title: string; commodity: string; unit: string; currency: string; status: string; timeZone: string;
    publishedAt: string | null; closesAt: string; closedAt: string | null; estimatedValue: number | null;
    buyingBody: { name: string; address: string; email: string; country: string } | null;
    regions: { code: string; name: string; forecast: number }[]; totalForecast: number;
    standstillDays: number; standstillExemption: string | null; standstillEndsAt: string | null;
  };
  awardBasis: string[];
  clarifications: { number: number; question: string; answer: string; answeredAt: string }[];
  amendments: { number: number; issuedAt: string; reason: string }[];
  opening: { digest: string; received: number; withdrawn: number; openedAt: string } | null;
  bids: {
    vendor: string; sme: boolean; fixedFee: number; capacity: number | null; regionsPriced: number;
    /** Fixed fee + Σ unit price × forecast over the regions it priced. */
    totalAtForecast: number; compliance: string; abnormallyLow: string | null;
  }[];
  tabulation: { received: number; compliant: number; excluded: number; notChecked: number };
  scenarios: {
    rows: { name: string; awardable: boolean; whatIf: string | null; status: string; total: number | null; overSplit: number | null; overSplitPercent: number | null; vendorsAwarded: number }[];
    costOfSoleAward: { low: number; high: number; lowPercent: number; highPercent: number; exact: boolean } | null;
  };
  chosen: {
    runId: string; scenarioName: string; recommendation: string; statusWords: string | null; total: number | null;
    fixedCost: number | null; variableCost: number | null; engine: string | null; gap: number | null; inputDigest: string;
    vendors: { vendor: string; fixedFee: number; quantity: number; value: number; share: number }[];
    lines: { region: string; regionName: string; vendor: string; quantity: number; unitPrice: number; value: number }[];
  } | null;
  /** Why each region went where it did; null when the explanation was not computed. */
  explanation: { region: string; why: string }[] | null;
  /** Losing each awarded vendor; null when the check was not run. */
  dropOut: { vendor: string; words: string }[] | null;
  /** The forecast checks' summaries; null when none was run. */
  forecastChecks: string[] | null;
  recommendations: { round: number; status: string; recommendedBy: string; recommendedAt: string; justification: string; decidedBy: string | null; decidedAt: string | null; comment: string | null }[];
  contracts: { vendor: string; signedOn: string | null; recordedBy: string | null }[];
  audit: { headHash: string | null; entries: number; verified: boolean; message: string };
}

const RECOMMENDATION_WORDS: Record<RecommendationView['status'], string> = {
  recommended: 'Recommended, awaiting compliance', approved: 'Approved', returned: 'Returned by compliance',
};

/**
 * The report of a closed tender (buyer owning it, compliance): 409 while the bids are sealed,
 * 404 for a tender the user cannot see.
 */
export async function reportContent(em: EntityManager, user: User, tenderId: string, now = new Date()): Promise<ReportContent> {
  const tender = await findVisibleTender(em, user, tenderId);
  if (isSealed(tender.status) || tender.status === 'cancelled') {
    throw new ConflictError('The evaluation report is made after closing, once the bids are opened.');
  }
  const view = await tenderView(em, user, tenderId);
  const regionName = new Map(view.regions.map((r) => [r.code, r.name]));
  const answer = await bidsOf(em, user, tenderId);
  const tabulated = 'bids' in answer ? answer.bids : [];
  const questions = await listQuestions(em, user, tenderId);
  // A tender closed before opening records were kept has none (404): the report says so.
  const opening = await openingRecordOf(em, user, tenderId).catch((e: unknown) => {
    if (e instanceof AppError && e.status === 404) return null;
    throw e;
  });
  const { recommendation, history } = await currentRecommendation(em, user, tenderId);
  const rounds = [...history].reverse().concat(recommendation ? [recommendation] : []);
  const chosenRound = recommendation && recommendation.status !== 'returned' ? recommendation : null;

  const scenarios = await listScenarios(em, user, tenderId);
  const compared = scenarios.flatMap((s) => (s.latestRun && s.latestRun.droppedVendor === null ? [s.latestRun.id] : []));
  const comparison = await compareRuns(em, user, tenderId, compared);

  let chosen: ReportContent['chosen'] = null;
  let explanation: ReportContent['explanation'] = null;
  let dropOut: ReportContent['dropOut'] = null;
  let forecastChecks: ReportContent['forecastChecks'] = null;
  if (chosenRound) {
    const run = await runView(em, user, chosenRound.runId);
    const result = run.result;
    const name = (id: string) => run.vendors[id]?.name ?? id;
    chosen = {
      runId: run.id, scenarioName: run.scenarioName, recommendation: RECOMMENDATION_WORDS[chosenRound.status],
      statusWords: awardStatusWords(result), total: result?.objective ?? null, fixedCost: result?.fixedCost ?? null,
      variableCost: result?.variableCost ?? null, engine: result?.engine ?? null, gap: result?.gap ?? null, inputDigest: run.inputDigest,
      vendors: (result?.awards ?? []).map((a) => ({ vendor: name(a.vendor), fixedFee: a.fixedFee, quantity: a.quantity, value: a.value, share: a.share })),
      lines: (result?.awards ?? []).flatMap((a) => a.lines.filter((l) => l.quantity > 0).map((l) => ({
        region: l.region, regionName: regionName.get(l.region) ?? run.regions[l.region]?.name ?? l.region,
        vendor: name(a.vendor), quantity: l.quantity, unitPrice: l.unitPrice, value: l.cost,
      }))).sort((x, y) => view.regions.findIndex((r) => r.code === x.region) - view.regions.findIndex((r) => r.code === y.region) || x.vendor.localeCompare(y.vendor)),
    };
    const ctx = { currency: view.currency, unit: view.unit };
    const why = await explanationOf(em, user, run.id);
    if (why.result) {
      explanation = why.result.regions.map((r) => ({
        region: `${r.regionName} (${r.region})`,
        why: r.challenger
          ? `Awarded to ${r.awarded.map((a) => a.vendorName).join(' and ')}. ${r.challenger.vendorName} (unit price ${formatMoney(r.challenger.unitPrice, view.currency)}) got none of it: ${r.challenger.words}; ${extraCostWords(r.challenger, ctx)}.`
          : `Awarded to ${r.awarded.map((a) => a.vendorName).join(' and ')}. No other compliant bid priced this region.`,
      }));
    }
    const resilience = await resilienceOf(em, user, run.id);
    if (resilience.rows.some((r) => !r.required)) {
      dropOut = resilience.rows.map((r) => ({
        vendor: r.vendorName,
        words: r.required ? 'Required by the scenario: not checked.'
          : r.status === 'infeasible' ? 'Without it, no award is possible under the rules.'
            : r.increase !== null ? `Without it, the award would cost ${formatMoney(r.increase, view.currency)} more (${percentText(r.increasePercent ?? 0)}).${r.worst ? ' The worst case.' : ''}`
              : 'The check did not finish.',
      }));
    }
    const sensitivity = await sensitivityOf(em, user, run.id);
    const checks = [...(sensitivity.all ? [sensitivity.all] : []), ...sensitivity.regions];
    if (checks.length) forecastChecks = checks.map((c) => (c.regionName ? `${c.regionName}: ${c.summary}` : c.summary));
  }

  const contracts = await listContracts(em, user, tenderId, now);
  const trail = await auditTrail(em, tenderId);
  const verification = await verifyTrail(em, tenderId);
  const excluded = tabulated.filter((b) => b.compliance.decision === 'excluded').length;
  const compliant = tabulated.filter((b) => b.compliance.decision === 'compliant').length;
  return {
    generatedAt: now.toISOString(),
    tender: {
      id: view.id, reference: view.reference, title: view.title, commodity: view.commodity, unit: view.unit, currency: view.currency,
      status: view.status, timeZone: view.timeZone, publishedAt: view.publishedAt, closesAt: view.closesAt, closedAt: view.closedAt,
      estimatedValue: view.estimatedValue ?? null, buyingBody: view.buyingBody, regions: view.regions, totalForecast: view.totalForecast,
      standstillDays: view.standstillDays, standstillExemption: view.standstillExemption, standstillEndsAt: view.standstillEndsAt,
    },
    awardBasis: describeAwardBasis(view.awardBasis, { unit: view.unit, regions: view.regions }),
    clarifications: questions.flatMap((q) => (q.status === 'answered' && q.number !== null ? [{ number: q.number, question: q.question, answer: q.answer ?? '', answeredAt: q.answeredAt ?? '' }] : []))
      .sort((a, b) => a.number - b.number),
    amendments: view.amendments.map((a) => ({ number: a.number, issuedAt: a.issuedAt, reason: a.reason })),
    opening: opening ? { digest: opening.digest, received: opening.record.bids.length, withdrawn: opening.record.withdrawn.length, openedAt: opening.record.openedAt } : null,
    bids: tabulated.map((b) => ({
      vendor: b.vendor.name, sme: b.vendor.sme, fixedFee: b.fixedFee, capacity: b.capacity, regionsPriced: Object.keys(b.prices).length,
      totalAtForecast: b.fixedFee + view.regions.reduce((s, r) => s + (b.prices[r.code] ?? 0) * r.forecast, 0),
      compliance: b.compliance.decision === 'excluded'
        ? `Excluded: ${b.compliance.ground ? EXCLUSION_GROUND_LABELS[b.compliance.ground] : 'no ground recorded'}${b.compliance.note ? ` (${b.compliance.note})` : ''}`
        : b.compliance.decision === 'compliant' ? 'Compliant' : 'Not checked',
      abnormallyLow: b.abnormallyLow
        ? `${b.abnormallyLow.accepted ? 'Explanation accepted' : 'Explanation not accepted'}${b.abnormallyLow.note ? `: ${b.abnormallyLow.note}` : ''}`
        : (b.flags.prices.length || b.flags.total) ? 'Flagged, not decided' : null,
    })),
    tabulation: { received: answer.submitted, compliant, excluded, notChecked: tabulated.length - compliant - excluded },
    scenarios: {
      rows: comparison.runs.map((r) => ({
        name: r.scenarioName, awardable: r.awardable, whatIf: r.whatIf, status: r.status, total: r.objective,
        overSplit: r.priceOverSplit, overSplitPercent: r.priceOverSplitPercent, vendorsAwarded: r.vendorsAwarded,
      })),
      costOfSoleAward: comparison.costOfSoleAward,
    },
    chosen, explanation, dropOut, forecastChecks,
    recommendations: rounds.map((r, i) => ({
      round: i + 1, status: RECOMMENDATION_WORDS[r.status], recommendedBy: r.recommendedBy.name, recommendedAt: r.recommendedAt,
      justification: r.justification, decidedBy: r.decidedBy?.name ?? null, decidedAt: r.decidedAt, comment: r.comment,
    })),
    contracts: contracts.vendors.map((v) => ({ vendor: v.vendor.name, signedOn: v.contract?.signedOn ?? null, recordedBy: v.contract?.recordedBy.name ?? null })),
    audit: { headHash: trail.at(-1)?.hash ?? null, entries: trail.length, verified: verification.ok, message: verification.message },
  };
}
