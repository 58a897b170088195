import { FormArray, FormControl, FormGroup, NonNullableFormBuilder, ValidatorFn } from '@angular/forms';
import { regionInputSchema, type RegionInput } from '@shared/bids';
import { tenderInputSchema, type TenderInput, type TenderView } from '@shared/tenders';
import type { FieldProblem } from '../../core/http/api-error';
import { zodValidator } from '../../ui/zod-validator';
import { controlPath as toControlPath } from '@shared/field-path';

const fields = tenderInputSchema.shape;
const regionFields = regionInputSchema.shape;

export type RegionGroup = FormGroup<{
  code: FormControl<string>;
  name: FormControl<string>;
  forecast: FormControl<number | null>;
}>;

export function regionGroup(fb: NonNullableFormBuilder, region?: RegionInput): RegionGroup {
  return fb.group({
    code: [region?.code ?? '', zodValidator(regionFields.code)],
    name: [region?.name ?? '', zodValidator(regionFields.name)],
    forecast: new FormControl<number | null>(region?.forecast ?? null, zodValidator(regionFields.forecast)),
  });
}

/** Date and time are both required and, together, must lie in the future. */
const closingTimeValidator: ValidatorFn = (group) => {
  const date = group.get('closesDate')?.value as string;
  const time = group.get('closesTime')?.value as string;
  if (!date || !time) return { closing: 'Enter the closing date and time.' };
  const at = new Date(`${date}T${time}`);
  if (Number.isNaN(at.getTime())) return { closing: 'Enter the closing date and time.' };
  return at.getTime() > Date.now() ? null : { closing: 'Closing time must be in the future.' };
};

export function tenderForm(fb: NonNullableFormBuilder) {
  return fb.group(
    {
      reference: ['', zodValidator(fields.reference)],
      title: ['', zodValidator(fields.title)],
      commodity: ['', zodValidator(fields.commodity)],
      unit: ['t', zodValidator(fields.unit)],
      currency: ['EUR', zodValidator(fields.currency)],
      closesDate: [''],
      closesTime: ['12:00'],
      standstillDays: new FormControl<number | null>(10, zodValidator(fields.standstillDays)),
      locale: ['en-GB', zodValidator(fields.locale)],
      description: ['', zodValidator(fields.description)],
      regions: fb.array<RegionGroup>([regionGroup(fb)]),
    },
    { validators: closingTimeValidator },
  );
}
export type TenderForm = ReturnType<typeof tenderForm>;

function pad(n: number): string {
  return String(n).padStart(2, '0');
}

/** A local date and time as ISO 8601 with the viewer's own offset, e.g. 2027-03-01T12:00:00+01:00. */
export function localIso(date: string, time: string): string {
  const at = new Date(`${date}T${time}`);
  const offset = -at.getTimezoneOffset();
  const sign = offset >= 0 ? '+' : '-';
  const abs = Math.abs(offset);
  return `${date}T${time.slice(0, 5)}:00${sign}${pad(Math.floor(abs / 60))}:${pad(abs % 60)}`;
}

/** The local date (yyyy-mm-dd) and time (hh:mm) of an instant, for the date and time inputs. */
export function localParts(iso: string): { date: string; time: string } {
  const d = new Date(iso);
  return {
    date: `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}`,
    time: `${pad(d.getHours())}:${pad(d.getMinutes())}`,
  };
}

export function fillForm(fb: NonNullableFormBuilder, form: TenderForm, tender: TenderView): void {
  const { date, time } = localParts(tender.closesAt);
  form.patchValue({
    reference: tender.reference,
    title: tender.title,
    commodity: tender.commodity,
    unit: tender.unit,
    currency: tender.currency,
    closesDate: date,
    closesTime: time,
    standstillDays: tender.standstillDays,
    locale: tender.locale ?? 'en-GB',
    description: tender.description,
  });
  setRegions(fb, form.controls.regions, tender.regions);
}

export function setRegions(fb: NonNullableFormBuilder, array: FormArray<RegionGroup>, regions: readonly RegionInput[]): void {
  array.clear();
  for (const region of regions) array.push(regionGroup(fb, region));
  array.markAsDirty();
}

/** The form's value as the body the server takes (the schema then trims and checks it). */
export function formBody(form: TenderForm): unknown {
  const v = form.getRawValue();
  return {
    reference: v.reference,
    title: v.title,
    commodity: v.commodity,
    unit: v.unit,
    currency: v.currency.trim().toUpperCase(),
    closesAt: v.closesDate && v.closesTime ? localIso(v.closesDate, v.closesTime) : '',
    standstillDays: v.standstillDays,
    locale: v.locale.trim(),
    description: v.description,
    regions: v.regions,
    // Not in the form yet: the server's defaults apply.
    awardBasis: undefined,
    buyingBody: undefined,
    timeZone: undefined,
    estimatedValue: undefined,
    bidValidityDays: undefined,
    clarificationsCloseAt: undefined,
    abnormallyLowPercent: undefined,
  } satisfies Record<keyof TenderInput, unknown>;
}

/**
 * Turns a field path from zod (['regions', 3, 'forecast']) or from the server ('regions[3].forecast')
 * into this form's control path ('regions.3.forecast'); the closing time lives in two inputs.
 */
export function controlPath(field: string | readonly PropertyKey[]): string {
  const path = toControlPath(field);
  return path === 'closesAt' ? 'closesDate' : path;
}

/** Puts each problem on its control; returns the ones with no control (for the form-level line). */
export function placeProblems(form: TenderForm, problems: readonly FieldProblem[]): string[] {
  const unplaced: string[] = [];
  for (const problem of problems) {
    const control = problem.field ? form.get(controlPath(problem.field)) : null;
    if (control && control !== form) {
      control.setErrors({ ...control.errors, server: problem.message });
      control.markAsTouched();
    } else {
      unplaced.push(problem.message);
    }
  }
  return unplaced;
}
