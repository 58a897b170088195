import type { EntityManager } from '@mikro-orm/postgresql';
import type { AwardProblem, AwardRules } from '@shared/award';
import type { Tender } from '../../entities';
import { digestOf } from '../audit.service';
import { tabulate } from '../bids.service';

/**
 * The engine's problem file for a closed tender: every live (submitted or revised) bid, vendor id =
 * vendor organisation id, region id = region code, and the scenario's rules. Its digest identifies
 * exactly what was solved.
 */
export async function buildProblem(em: EntityManager, tender: Tender, rules: AwardRules, timeLimitSeconds: number): Promise<{ problem: AwardProblem; digest: string }> {
  // Plain rows, not entities: 30 bids × 200 lines loaded as tracked entities made every run's
  // queueing cost the web server close to a second of CPU (bench:queue), most of it in the
  // change check of the flush that followed.
  const regions = await em.execute<{ code: string; name: string; forecast: string | number }[]>(
    'select code, name, forecast from region where tender_id = ? order by position', [tender.id],
  );
  const bids = await tabulate(em, tender);
  const problem: AwardProblem = {
    version: 1,
    currency: tender.currency,
    unit: tender.unit,
    regions: regions.map((r) => ({ id: r.code, name: r.name, demand: Number(r.forecast) })),
    vendors: bids.map((b) => ({ id: b.vendor.id, name: b.vendor.name, fixedFee: b.fixedFee, capacity: b.capacity, sme: b.vendor.sme, prices: b.prices })),
    rules,
    options: { timeLimitSeconds, relativeGap: 0 },
  };
  return { problem, digest: digestOf(problem) };
}

/** Default rules, as the schema would fill them. */
export function plainRules(sourcing: 'split' | 'sole'): AwardRules {
  return { sourcing, soleRegions: [], exclude: [], require: [] };
}
