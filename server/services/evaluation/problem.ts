import type { EntityManager } from '@mikro-orm/postgresql';
import type { AwardProblem, AwardRules } from '@shared/award';
import { Bid, type Tender } from '../../entities';
import { digestOf } from '../audit.service';

/**
 * The engine's problem file for a closed tender: every live (submitted or revised) bid, vendor id =
 * vendor organisation id, region id = region code, and the scenario's rules. Its digest identifies
 * exactly what was solved.
 */
export async function buildProblem(em: EntityManager, tender: Tender, rules: AwardRules, timeLimitSeconds: number): Promise<{ problem: AwardProblem; digest: string }> {
  await em.populate(tender, ['regions']);
  const bids = await em.find(Bid, { tender, status: { $in: ['submitted', 'revised'] } }, { populate: ['lines.region', 'vendorOrganisation'], orderBy: { vendorOrganisation: { name: 'asc' } } });
  const problem: AwardProblem = {
    version: 1,
    currency: tender.currency,
    unit: tender.unit,
    regions: tender.regions.getItems().map((r) => ({ id: r.code, name: r.name, demand: r.forecast })),
    vendors: bids.map((b) => ({
      id: b.vendorOrganisation.id,
      name: b.vendorOrganisation.name,
      fixedFee: b.fixedFee,
      capacity: b.capacity ?? null,
      sme: b.vendorOrganisation.sme,
      prices: Object.fromEntries(b.lines.getItems().map((l) => [l.region.code, l.unitPrice])),
    })),
    rules,
    options: { timeLimitSeconds, relativeGap: 0 },
  };
  return { problem, digest: digestOf(problem) };
}

/** Default rules, as the schema would fill them. */
export function plainRules(sourcing: 'split' | 'sole'): AwardRules {
  return { sourcing, soleRegions: [], exclude: [], require: [] };
}
