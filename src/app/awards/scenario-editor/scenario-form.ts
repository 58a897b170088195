import { AbstractControl, FormControl, FormGroup, ValidationErrors, ValidatorFn } from '@angular/forms';
import type { ScenarioInput, ScenarioView } from '@shared/evaluation';
import { awardRulesSchema } from '@shared/award';
import { scenarioInputSchema } from '@shared/evaluation';
import type { ZodType } from 'zod';
import { zodValidator } from '../../ui/zod-validator';

const rules = awardRulesSchema.shape;

/**
 * An optional number field: empty means "no such rule"; anything typed is checked by the shared
 * schema's own rule, so the message under the field is the one the server would send.
 */
function optionalNumber(schema: ZodType): ValidatorFn {
  const check = zodValidator(schema);
  return (control: AbstractControl): ValidationErrors | null => (control.value === null ? null : check(control));
}

/**
 * Shares are typed as percentages but the schema (and the engine) take fractions; the schema's
 * message speaks of 0..1, which would puzzle someone typing 60, so the range is restated in %.
 */
function optionalPercent(schema: ZodType, label: string): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const value: unknown = control.value;
    if (value === null) return null;
    if (typeof value !== 'number' || !schema.safeParse(value / 100).success) {
      return { zod: `${label} must be between 0 and 100 %.` };
    }
    return null;
  };
}

/** Minimum and maximum number of vendors must agree; the message matches the engine's own check. */
const vendorCountsAgree: ValidatorFn = (group: AbstractControl): ValidationErrors | null => {
  const min = group.get('minVendors')?.value as number | null;
  const max = group.get('maxVendors')?.value as number | null;
  return min !== null && max !== null && min > max
    ? { vendorCounts: `Minimum number of vendors (${min}) is above the maximum (${max}).` }
    : null;
};

/** A vendor cannot be both excluded and required: the run could only be infeasible. */
const excludeRequireDisjoint: ValidatorFn = (group: AbstractControl): ValidationErrors | null => {
  const exclude = (group.get('exclude')?.value as string[]) ?? [];
  const require = new Set((group.get('require')?.value as string[]) ?? []);
  return exclude.some((id) => require.has(id)) ? { excludeRequire: 'A vendor cannot be both excluded and required.' } : null;
};

/** Control names follow the request body, so the server's `rules.maxVendors` errors land on the right field. */
export function scenarioForm(scenario: ScenarioView | null) {
  const r = scenario?.rules;
  const pct = (fraction: number | undefined) => (fraction === undefined ? null : Math.round(fraction * 10000) / 100);
  return new FormGroup({
    name: new FormControl(scenario?.name ?? '', { nonNullable: true, validators: zodValidator(scenarioInputSchema.shape.name) }),
    timeLimitSeconds: new FormControl<number | null>(scenario?.timeLimitSeconds ?? 60, {
      validators: (control) =>
        control.value === null ? { zod: 'Time limit must be a number of seconds.' } : zodValidator(scenarioInputSchema.shape.timeLimitSeconds)(control),
    }),
    rules: new FormGroup(
      {
        sourcing: new FormControl<'split' | 'sole'>(r?.sourcing ?? 'split', { nonNullable: true }),
        soleRegions: new FormControl<string[]>(r?.soleRegions ?? [], { nonNullable: true }),
        maxVendors: new FormControl<number | null>(r?.maxVendors ?? null, optionalNumber(rules.maxVendors)),
        minVendors: new FormControl<number | null>(r?.minVendors ?? null, optionalNumber(rules.minVendors)),
        maxVendorShare: new FormControl<number | null>(pct(r?.maxVendorShare), optionalPercent(rules.maxVendorShare, 'Maximum vendor share')),
        maxRegionShare: new FormControl<number | null>(pct(r?.maxRegionShare), optionalPercent(rules.maxRegionShare, 'Maximum region share')),
        minAwardQuantity: new FormControl<number | null>(r?.minAwardQuantity ?? null, optionalNumber(rules.minAwardQuantity)),
        exclude: new FormControl<string[]>(r?.exclude ?? [], { nonNullable: true }),
        require: new FormControl<string[]>(r?.require ?? [], { nonNullable: true }),
        smeShare: new FormControl<number | null>(pct(r?.smeShare), optionalPercent(rules.smeShare, 'SME share')),
      },
      { validators: [vendorCountsAgree, excludeRequireDisjoint] },
    ),
  });
}
export type ScenarioForm = ReturnType<typeof scenarioForm>;

/** The request body: empty fields are left out (no rule), percentages become fractions. */
export function scenarioInput(form: ScenarioForm): ScenarioInput {
  const value = form.getRawValue();
  const r = value.rules;
  const fraction = (p: number | null) => (p === null ? undefined : Math.round(p * 100) / 10000);
  const optional = (n: number | null) => (n === null ? undefined : n);
  const input: ScenarioInput = {
    name: value.name.trim(),
    timeLimitSeconds: value.timeLimitSeconds ?? 60,
    rules: {
      sourcing: r.sourcing,
      // Listing sole regions only means something when the other regions may be split.
      soleRegions: r.sourcing === 'split' ? r.soleRegions : [],
      maxVendors: optional(r.maxVendors),
      minVendors: optional(r.minVendors),
      maxVendorShare: fraction(r.maxVendorShare),
      maxRegionShare: fraction(r.maxRegionShare),
      minAwardQuantity: optional(r.minAwardQuantity),
      exclude: r.exclude,
      require: r.require,
      smeShare: fraction(r.smeShare),
    },
  };
  // Leave out undefined keys so the body reads as the rules that apply.
  input.rules = Object.fromEntries(Object.entries(input.rules).filter(([, v]) => v !== undefined));
  return input;
}
