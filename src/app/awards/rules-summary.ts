import type { AwardRules } from '@shared/award';
import { byCode } from '@shared/bids';
import { fractionPercent, quantity } from '../ui/number-format';

/** Names for the ids a rule mentions; an id without a name is shown as it is. */
export interface RuleNames {
  regions: Record<string, string>;
  vendors: Record<string, string>;
}

/** A scenario's rules as short phrases, for tables and the compare screen. */
export function describeRules(rules: AwardRules, names: RuleNames): string[] {
  const region = (code: string) => byCode(names.regions, code) ?? code;
  const vendor = (id: string) => byCode(names.vendors, id) ?? id;
  const phrases: string[] = [];
  if (rules.sourcing === 'sole') phrases.push('Sole award in every region');
  else if (rules.soleRegions.length > 0) phrases.push(`Sole award in ${rules.soleRegions.map(region).join(', ')}`);
  else phrases.push('Split award allowed in every region');
  if (rules.minVendors !== undefined) phrases.push(`At least ${rules.minVendors} vendors`);
  if (rules.maxVendors !== undefined) phrases.push(`At most ${rules.maxVendors} vendors`);
  if (rules.maxVendorShare !== undefined) phrases.push(`No vendor above ${fractionPercent(rules.maxVendorShare)} of the volume`);
  if (rules.maxRegionShare !== undefined) phrases.push(`No vendor above ${fractionPercent(rules.maxRegionShare)} of a region`);
  if (rules.minAwardQuantity !== undefined) phrases.push(`An awarded vendor supplies at least ${quantity(rules.minAwardQuantity)}`);
  if (rules.smeShare !== undefined) phrases.push(`At least ${fractionPercent(rules.smeShare)} of the volume to SMEs`);
  if (rules.exclude.length > 0) phrases.push(`Excluded: ${rules.exclude.map(vendor).join(', ')}`);
  if (rules.require.length > 0) phrases.push(`Required: ${rules.require.map(vendor).join(', ')}`);
  return phrases;
}
