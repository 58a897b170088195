import type { EntityManager } from '@mikro-orm/postgresql';
import type { AwardProblem, AwardRules } from '@shared/award';
import { EXCLUSION_GROUND_LABELS } from '@shared/compliance';
import type { Tender } from '../../entities';
import { ConflictError } from '../../http/errors';
import { digestOf } from '../audit.service';
import { tabulate } from '../bids.service';
import { tenderRegionRows } from '../queries/tender-rows.queries';

/**
 * The engine's problem file for a closed tender: every live (submitted or revised) bid that the
 * compliance check did not exclude, vendor id = vendor organisation id, region id = region code,
 * and the scenario's rules. Its digest identifies exactly what was solved. Excluded bids are out of
 * every scenario: a scenario's own `exclude` naming one is satisfied already (dropped from the
 * problem's rules), a scenario that requires one cannot be solved (409 naming the vendor).
 * `bidders` are every live bid's vendor, excluded ones included (scenario rules may name them).
 */
export async function buildProblem(
  em: EntityManager, tender: Tender, rules: AwardRules, timeLimitSeconds: number,
): Promise<{ problem: AwardProblem; digest: string; bidders: Set<string> }> {
  // Plain rows, not entities: 30 bids × 200 lines loaded as tracked entities made every run's
  // queueing cost the web server close to a second of CPU (bench:queue), most of it in the
  // change check of the flush that followed.
  const regions = await tenderRegionRows(em, tender.id);
  const all = await tabulate(em, tender);
  const excluded = new Map(all.filter((b) => b.compliance.decision === 'excluded').map((b) => [b.vendor.id, b]));
  const required = rules.require.flatMap((v, i) => {
    const bid = excluded.get(v);
    return bid ? [{ field: `rules.require[${i}]`, message: `${bid.vendor.name} is excluded by the compliance check (${EXCLUSION_GROUND_LABELS[bid.compliance.ground!]}) and cannot be required.` }] : [];
  });
  if (required.length) {
    throw new ConflictError(`This scenario requires a vendor whose bid is excluded: ${required.map((e) => e.message).join(' ')} Remove it from the required vendors.`, required);
  }
  const bids = all.filter((b) => !excluded.has(b.vendor.id));
  const problem: AwardProblem = {
    version: 1,
    currency: tender.currency,
    unit: tender.unit,
    regions: regions.map((r) => ({ id: r.code, name: r.name, demand: Number(r.forecast) })),
    vendors: bids.map((b) => ({ id: b.vendor.id, name: b.vendor.name, fixedFee: b.fixedFee, capacity: b.capacity, sme: b.vendor.sme, prices: b.prices })),
    rules: excluded.size ? { ...rules, exclude: rules.exclude.filter((v) => !excluded.has(v)) } : rules,
    options: { timeLimitSeconds, relativeGap: 0 },
  };
  return { problem, digest: digestOf(problem), bidders: new Set(all.map((b) => b.vendor.id)) };
}

/** Default rules, as the schema would fill them. */
export function plainRules(sourcing: 'split' | 'sole'): AwardRules {
  return { sourcing, soleRegions: [], exclude: [], require: [] };
}
