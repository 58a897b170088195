import type { EntityManager } from '@mikro-orm/postgresql';
import type { AwardProblem, AwardRules } from '@shared/award';
import type { Tender } from '../../entities';
import { digestOf } from '../audit.service';

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
  const bids = await em.execute<{
    vendor_id: string; vendor_name: string; sme: boolean; fixed_fee: string | number; capacity: string | number | null; prices: Record<string, number | string> | null;
  }[]>(
    `select o.id as vendor_id, o.name as vendor_name, o.sme, b.fixed_fee, b.capacity,
            (select json_object_agg(r.code, l.unit_price order by r.position)
               from bid_line l join region r on r.id = l.region_id where l.bid_id = b.id) as prices
       from bid b join vendor_organisation o on o.id = b.vendor_organisation_id
      where b.tender_id = ? and b.status in ('submitted', 'revised')
      order by o.name asc, o.id asc`,
    [tender.id],
  );
  const problem: AwardProblem = {
    version: 1,
    currency: tender.currency,
    unit: tender.unit,
    regions: regions.map((r) => ({ id: r.code, name: r.name, demand: Number(r.forecast) })),
    vendors: bids.map((b) => ({
      id: b.vendor_id,
      name: b.vendor_name,
      fixedFee: Number(b.fixed_fee),
      capacity: b.capacity === null ? null : Number(b.capacity),
      sme: b.sme,
      prices: Object.fromEntries(Object.entries(b.prices ?? {}).map(([code, price]) => [code, Number(price)])),
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
