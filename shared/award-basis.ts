import type { AwardRules } from './award';
import type { AwardBasis } from './tenders';

/**
 * The published award basis in the buyer's words, and how a scenario's rules compare with it.
 * One place for both: the tender page, the bid workbook's cover sheet, the invitation e-mail, the
 * scenario lists and the 409 of a what-if's recommendation all speak these sentences.
 */

const quantity = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 4 });

/** 0.45 → "45 %" (a fraction as the API stores it, as a percentage in words). */
export function percent(fraction: number): string {
  return `${quantity.format(Math.round(fraction * 1e6) / 1e4)} %`;
}

export interface BasisContext {
  /** The tender's unit of measure (t, m³, meals…). */
  unit: string;
  /** The tender's regions, to name sole-awarded ones by name. */
  regions?: { code: string; name: string }[];
}

function regionNames(codes: string[], ctx: BasisContext): string {
  const names = codes.map((c) => {
    const region = ctx.regions?.find((r) => r.code === c);
    return region ? `${region.name} (${c})` : c;
  });
  return names.length <= 1 ? names.join('') : `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

/** The basis as plain sentences for vendors, one rule a sentence, in a fixed order. */
export function describeAwardBasis(basis: AwardBasis, ctx: BasisContext): string[] {
  const lines: string[] = [];
  const unit = ctx.unit;
  if (basis.sourcing === 'sole') {
    lines.push('Each region goes to one vendor.');
  } else if (basis.soleRegions.length) {
    const one = basis.soleRegions.length === 1;
    lines.push(`A region may be shared between vendors, except ${regionNames(basis.soleRegions, ctx)}, which ${one ? 'goes' : 'each go'} to one vendor.`);
  } else {
    lines.push('A region may be shared between vendors.');
  }
  const { minVendors, maxVendors } = basis;
  if (minVendors !== undefined && maxVendors !== undefined && minVendors === maxVendors) {
    lines.push(`Exactly ${maxVendors} ${maxVendors === 1 ? 'vendor' : 'vendors'} will be awarded.`);
  } else {
    if (maxVendors !== undefined) lines.push(`At most ${maxVendors} ${maxVendors === 1 ? 'vendor' : 'vendors'} will be awarded.`);
    if (minVendors !== undefined && minVendors > 0) lines.push(`At least ${minVendors} ${minVendors === 1 ? 'vendor' : 'vendors'} will be awarded.`);
  }
  if (basis.maxVendorShare !== undefined) lines.push(`No vendor will be awarded more than ${percent(basis.maxVendorShare)} of the total quantity.`);
  if (basis.maxRegionShare !== undefined) lines.push(`No vendor will be awarded more than ${percent(basis.maxRegionShare)} of any one region's quantity.`);
  if (basis.minAwardQuantity !== undefined) lines.push(`A vendor that is awarded gets at least ${quantity.format(basis.minAwardQuantity)} ${unit} in total.`);
  if (basis.smeShare !== undefined && basis.smeShare > 0) lines.push(`At least ${percent(basis.smeShare)} of the total quantity goes to small and medium-sized enterprises (SMEs).`);
  if (basis.awardIncrement !== undefined) lines.push(`Quantities are awarded in whole multiples of ${quantity.format(basis.awardIncrement)} ${unit}.`);
  lines.push('Within these rules, the award goes to the bids with the lowest total cost: fixed fees plus unit prices times the quantities awarded.');
  return lines;
}

/** The rules of the basis that a scenario is compared on, in the order a difference is named. */
const RULES = ['sourcing', 'soleRegions', 'maxVendors', 'minVendors', 'maxVendorShare', 'maxRegionShare', 'minAwardQuantity', 'smeShare', 'awardIncrement'] as const;
type BasisRule = (typeof RULES)[number];

/** Each rule of the basis in the buyer's words (the explanation of an award names rules with these too). */
export const LABEL: Record<BasisRule, string> = {
  sourcing: 'sourcing',
  soleRegions: 'sole-awarded regions',
  maxVendors: 'maximum number of vendors',
  minVendors: 'minimum number of vendors',
  maxVendorShare: 'maximum vendor share',
  maxRegionShare: 'maximum region share',
  minAwardQuantity: 'minimum award quantity',
  smeShare: 'SME share',
  awardIncrement: 'award increment',
};

type Comparable = Partial<Pick<AwardRules, BasisRule>> & { sourcing?: 'split' | 'sole' };

/**
 * A rule's value with the schema's defaults applied and "no limit" written one way: a share of
 * 100 %, a minimum of 0 vendors or an SME share of 0 % rule nothing out, exactly like no rule.
 */
function normalised(rules: Comparable, rule: BasisRule): string | number | undefined {
  switch (rule) {
    case 'sourcing':
      return rules.sourcing ?? 'split';
    case 'soleRegions':
      // Listed sole regions say nothing more when every region is sole.
      return (rules.sourcing ?? 'split') === 'sole' ? '' : [...new Set(rules.soleRegions ?? [])].sort().join(',');
    case 'maxVendorShare':
    case 'maxRegionShare':
      return rules[rule] === undefined || rules[rule] >= 1 ? undefined : rules[rule];
    case 'minVendors':
    case 'smeShare':
      return rules[rule] === undefined || rules[rule] <= 0 ? undefined : rules[rule];
    default:
      return rules[rule];
  }
}

function shown(rules: Comparable, rule: BasisRule): string {
  const v = normalised(rules, rule);
  if (rule === 'sourcing') return v === 'sole' ? 'each region to one vendor' : 'regions may be shared';
  if (rule === 'soleRegions') return v ? String(v).split(',').join(', ') : 'none';
  if (v === undefined) return 'none';
  if (rule === 'maxVendorShare' || rule === 'maxRegionShare' || rule === 'smeShare') return percent(Number(v));
  return quantity.format(Number(v));
}

/** Why a scenario is a what-if: the first rule that differs from the basis, as an API field error. */
export interface BasisDifference {
  field: string;
  message: string;
}

/**
 * null when `rules` are the published basis (after defaults), else the first difference. A
 * non-empty `exclude` or `require` list makes a what-if; the compliance check's exclusions are
 * not part of a scenario's rules and do not.
 */
export function basisDifference(rules: Comparable & { exclude?: string[]; require?: string[] }, basis: AwardBasis): BasisDifference | null {
  for (const rule of RULES) {
    if (normalised(rules, rule) !== normalised(basis, rule)) {
      return {
        field: `rules.${rule}`,
        message: `its ${LABEL[rule]} (${shown(rules, rule)}) differs from the published award basis (${shown(basis, rule)})`,
      };
    }
  }
  if (rules.exclude?.length) {
    return { field: 'rules.exclude', message: `it leaves out ${rules.exclude.length === 1 ? 'a vendor' : `${rules.exclude.length} vendors`}, which the published award basis does not` };
  }
  if (rules.require?.length) {
    return { field: 'rules.require', message: `it requires ${rules.require.length === 1 ? 'a vendor' : `${rules.require.length} vendors`} to be awarded, which the published award basis does not` };
  }
  return null;
}

/** "What-if: its maximum vendor share (50 %) differs from the published award basis (45 %)." */
export function whatIfNote(difference: BasisDifference): string {
  return `What-if: ${difference.message}. For analysis only; it cannot be recommended.`;
}
