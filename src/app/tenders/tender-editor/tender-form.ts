import { AbstractControl, FormArray, FormControl, FormGroup, NonNullableFormBuilder, ValidatorFn } from '@angular/forms';
import { regionInputSchema, type RegionInput } from '@shared/bids';
import { buyingBodySchema, closureDaysSchema, tenderInputSchema, timeZoneSchema, type AwardBasis, type TenderInput, type TenderView } from '@shared/tenders';
import { utcToWallTime, wallTimeToUtc } from '@shared/time-zone';
import { z, type ZodType } from 'zod';
import type { FieldProblem } from '../../core/http/api-error';
import { zodValidator } from '../../ui/zod-validator';
import { controlPath as toControlPath } from '@shared/field-path';

const fields = tenderInputSchema.shape;
const regionFields = regionInputSchema.shape;
const bodyFields = buyingBodySchema.shape;

/** The viewer's own zone: a new tender's default. */
export const VIEWER_TIME_ZONE = Intl.DateTimeFormat().resolvedOptions().timeZone;

/** An optional whole number from `min`; empty = no rule. */
const optionalCount = (label: string, min: number) =>
  z.number({ error: `${label} must be a whole number.` }).int({ error: `${label} must be a whole number.` }).min(min, { error: `${label} must be at least ${min}.` }).nullable();
/** An optional percentage as the form shows it (45 for 45 %); the API takes fractions (0.45). */
const optionalPercent = (label: string) =>
  z.number({ error: `${label} must be a number of percent.` }).min(0, { error: `${label} must be between 0 and 100 %.` }).max(100, { error: `${label} must be between 0 and 100 %.` }).nullable();
const optionalQuantity = (label: string, positive: boolean) =>
  z.number({ error: `${label} must be a number.` }).refine((v) => (positive ? v > 0 : v >= 0), { error: positive ? `${label} must be greater than 0 (leave it empty for none).` : `${label} must not be negative.` }).nullable();

export type AwardBasisGroup = FormGroup<{
  sourcing: FormControl<'split' | 'sole'>;
  soleRegions: FormControl<string[]>;
  maxVendors: FormControl<number | null>;
  minVendors: FormControl<number | null>;
  maxVendorShare: FormControl<number | null>;
  maxRegionShare: FormControl<number | null>;
  minAwardQuantity: FormControl<number | null>;
  smeShare: FormControl<number | null>;
  awardIncrement: FormControl<number | null>;
}>;

function awardBasisGroup(): AwardBasisGroup {
  return new FormGroup({
    sourcing: new FormControl<'split' | 'sole'>('split', { nonNullable: true }),
    soleRegions: new FormControl<string[]>([], { nonNullable: true }),
    maxVendors: new FormControl<number | null>(null, zodValidator(optionalCount('Maximum number of vendors', 1))),
    minVendors: new FormControl<number | null>(null, zodValidator(optionalCount('Minimum number of vendors', 0))),
    maxVendorShare: new FormControl<number | null>(null, zodValidator(optionalPercent('Maximum vendor share'))),
    maxRegionShare: new FormControl<number | null>(null, zodValidator(optionalPercent('Maximum region share'))),
    minAwardQuantity: new FormControl<number | null>(null, zodValidator(optionalQuantity('Minimum award quantity', false))),
    smeShare: new FormControl<number | null>(null, zodValidator(optionalPercent('SME share'))),
    awardIncrement: new FormControl<number | null>(null, zodValidator(optionalQuantity('Award increment', true))),
  });
}

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

/** A date and time of the tender's zone as a UTC ISO instant, or null when incomplete or the zone is unknown. */
export function zonedInstant(date: string, time: string, timeZone: string): string | null {
  if (!date || !time || !timeZoneSchema.safeParse(timeZone).success) return null;
  try {
    return wallTimeToUtc(`${date}T${time.slice(0, 5)}`, timeZone);
  } catch {
    return null;
  }
}

/** Date and time are both required and, together, must lie in the future (in the tender's zone). */
const closingTimeValidator: ValidatorFn = (group) => {
  const date = group.get('closesDate')?.value as string;
  const time = group.get('closesTime')?.value as string;
  const zone = group.get('timeZone')?.value as string;
  if (!date || !time) return { closing: 'Enter the closing date and time.' };
  const at = zonedInstant(date, time, zone);
  if (!at) return { closing: 'Enter the closing date and time, and a known time zone.' };
  return new Date(at).getTime() > Date.now() ? null : { closing: 'Closing time must be in the future.' };
};

/** A buying body's field: checked only once any of its fields is filled in (none at all is allowed on a draft). */
function bodyField(schema: ZodType, upperCase = false): ValidatorFn {
  return (control) => {
    const values = Object.values((control.parent?.getRawValue() ?? {}) as Record<string, string>);
    if (values.every((v) => !v.trim())) return null;
    // The country code is sent in capitals (formBody), so "ie" is as good as "IE".
    const text = String(control.value as string);
    const value = upperCase ? text.trim().toUpperCase() : text;
    const result = schema.safeParse(value);
    return result.success ? null : { zod: result.error.issues[0]?.message ?? 'Not valid.' };
  };
}

/** "2026-12-29, 2026-12-30" (commas, spaces or lines) → the list the API takes. */
export function splitDates(text: string): string[] {
  return text.split(/[\s,;]+/).filter((d) => d !== '');
}

export function tenderForm(fb: NonNullableFormBuilder) {
  const buyingBody = fb.group({
    name: ['', bodyField(bodyFields.name)],
    address: ['', bodyField(bodyFields.address)],
    email: ['', bodyField(bodyFields.email)],
    country: ['', bodyField(bodyFields.country, true)],
  });
  // A field's validity depends on its siblings: check all of them on every change.
  buyingBody.valueChanges.subscribe(() => {
    for (const control of Object.values(buyingBody.controls)) control.updateValueAndValidity({ emitEvent: false });
  });
  return fb.group(
    {
      reference: ['', zodValidator(fields.reference)],
      title: ['', zodValidator(fields.title)],
      commodity: ['', zodValidator(fields.commodity)],
      unit: ['t', zodValidator(fields.unit)],
      // Sent in capitals (formBody) and shown in capitals (class "upper"), so "eur" is as good as "EUR".
      currency: ['EUR', zodValidator(z.string().transform((v) => v.trim().toUpperCase()).pipe(fields.currency))],
      closesDate: [''],
      closesTime: ['12:00'],
      standstillDays: new FormControl<number | null>(10, zodValidator(fields.standstillDays)),
      locale: ['en-GB', zodValidator(fields.locale)],
      standstillExemption: ['', zodValidator(fields.standstillExemption)],
      closureDays: ['', zodValidator(z.string().transform(splitDates).pipe(closureDaysSchema))],
      description: ['', zodValidator(fields.description)],
      regions: fb.array<RegionGroup>([regionGroup(fb)]),
      awardBasis: awardBasisGroup(),
      buyingBody,
      timeZone: [VIEWER_TIME_ZONE, zodValidator(timeZoneSchema)],
      estimatedValue: new FormControl<number | null>(null, zodValidator(fields.estimatedValue)),
      bidValidityDays: new FormControl<number | null>(90, zodValidator(fields.bidValidityDays)),
      clarificationsDate: [''],
      clarificationsTime: ['12:00'],
      abnormallyLowPercent: new FormControl<number | null>(20, zodValidator(fields.abnormallyLowPercent)),
    },
    { validators: closingTimeValidator },
  );
}
export type TenderForm = ReturnType<typeof tenderForm>;

/** The date (yyyy-mm-dd) and time (hh:mm) of an instant in `timeZone`, for the date and time inputs. */
export function zonedParts(iso: string, timeZone: string): { date: string; time: string } {
  const [date, time] = utcToWallTime(iso, timeZone).split('T');
  return { date, time };
}

/** A fraction of the API (0.45) as the form's percentage (45), and back. */
const toPercent = (f: number | undefined) => (f === undefined ? null : Math.round(f * 1e6) / 1e4);
const toFraction = (p: number | null) => (p === null || (p as unknown) === '' ? undefined : Math.round(p * 1e4) / 1e6);
const orUndefined = (n: number | null) => (n === null || (n as unknown) === '' ? undefined : n);

export function fillForm(fb: NonNullableFormBuilder, form: TenderForm, tender: TenderView): void {
  const { date, time } = zonedParts(tender.closesAt, tender.timeZone);
  // The default deadline (5 days before closing) stays empty, so it follows a new closing time.
  const byDefault = new Date(tender.clarificationsCloseAt).getTime() === new Date(tender.closesAt).getTime() - 5 * 86_400_000;
  const clarifications = byDefault ? { date: '', time: '12:00' } : zonedParts(tender.clarificationsCloseAt, tender.timeZone);
  const b = tender.awardBasis;
  form.patchValue({
    timeZone: tender.timeZone,
    awardBasis: {
      sourcing: b.sourcing, soleRegions: b.soleRegions, maxVendors: b.maxVendors ?? null, minVendors: b.minVendors ?? null,
      maxVendorShare: toPercent(b.maxVendorShare), maxRegionShare: toPercent(b.maxRegionShare), minAwardQuantity: b.minAwardQuantity ?? null,
      smeShare: toPercent(b.smeShare), awardIncrement: b.awardIncrement ?? null,
    },
    buyingBody: { name: '', address: '', email: '', country: '', ...tender.buyingBody },
    estimatedValue: tender.estimatedValue ?? null,
    bidValidityDays: tender.bidValidityDays,
    clarificationsDate: clarifications.date,
    clarificationsTime: clarifications.time,
    abnormallyLowPercent: tender.abnormallyLowPercent,
    reference: tender.reference,
    title: tender.title,
    commodity: tender.commodity,
    unit: tender.unit,
    currency: tender.currency,
    closesDate: date,
    closesTime: time,
    standstillDays: tender.standstillDays,
    locale: tender.locale ?? 'en-GB',
    standstillExemption: tender.standstillExemption ?? '',
    closureDays: (tender.closureDays ?? []).join(', '),
    description: tender.description,
  });
  setRegions(fb, form.controls.regions, tender.regions);
}

export function setRegions(fb: NonNullableFormBuilder, array: FormArray<RegionGroup>, regions: readonly RegionInput[]): void {
  array.clear();
  for (const region of regions) array.push(regionGroup(fb, region));
  array.markAsDirty();
}

/** The basis as the API takes it: percentages as fractions, empty rules left out. */
function basisBody(v: TenderForm['controls']['awardBasis']['value']): AwardBasis {
  const basis: AwardBasis = { sourcing: v.sourcing ?? 'split', soleRegions: v.sourcing === 'sole' ? [] : (v.soleRegions ?? []) };
  const rules = {
    maxVendors: orUndefined(v.maxVendors ?? null), minVendors: orUndefined(v.minVendors ?? null),
    maxVendorShare: toFraction(v.maxVendorShare ?? null), maxRegionShare: toFraction(v.maxRegionShare ?? null),
    minAwardQuantity: orUndefined(v.minAwardQuantity ?? null), smeShare: toFraction(v.smeShare ?? null), awardIncrement: orUndefined(v.awardIncrement ?? null),
  };
  for (const [key, value] of Object.entries(rules)) if (value !== undefined) Object.assign(basis, { [key]: value });
  return basis;
}

/** The form's value as the body the server takes (the schema then trims and checks it). */
export function formBody(form: TenderForm): unknown {
  const v = form.getRawValue();
  const body = v.buyingBody;
  const noBody = !body.name.trim() && !body.address.trim() && !body.email.trim() && !body.country.trim();
  return {
    reference: v.reference,
    title: v.title,
    commodity: v.commodity,
    unit: v.unit,
    currency: v.currency.trim().toUpperCase(),
    closesAt: zonedInstant(v.closesDate, v.closesTime, v.timeZone) ?? '',
    standstillDays: v.standstillDays,
    locale: v.locale.trim(),
    standstillExemption: v.standstillDays === 0 ? v.standstillExemption : null,
    closureDays: splitDates(v.closureDays),
    description: v.description,
    regions: v.regions,
    awardBasis: basisBody(v.awardBasis),
    // Until the buyer names one (publishing needs it), none.
    buyingBody: noBody ? null : { ...body, country: body.country.trim().toUpperCase() },
    timeZone: v.timeZone,
    estimatedValue: orUndefined(v.estimatedValue) ?? null,
    bidValidityDays: v.bidValidityDays,
    // Empty: the default, 5 days before closing.
    clarificationsCloseAt: v.clarificationsDate ? zonedInstant(v.clarificationsDate, v.clarificationsTime, v.timeZone) ?? '' : null,
    abnormallyLowPercent: v.abnormallyLowPercent,
  } satisfies Record<keyof TenderInput, unknown>;
}

/**
 * Turns a field path from zod (['regions', 3, 'forecast']) or from the server ('regions[3].forecast')
 * into this form's control path ('regions.3.forecast'); the closing time lives in two inputs.
 */
export function controlPath(field: string | readonly PropertyKey[]): string {
  const path = toControlPath(field);
  if (path === 'closesAt') return 'closesDate';
  if (path === 'clarificationsCloseAt') return 'clarificationsDate';
  if (path.startsWith('closureDays')) return 'closureDays';
  // One control holds the list of sole-awarded regions.
  if (path.startsWith('awardBasis.soleRegions.')) return 'awardBasis.soleRegions';
  return path;
}

/**
 * Drops the server's earlier refusals before a new attempt: some depend on other fields (a
 * forecast refused for the award increment), so they must not outlive the change that cures them.
 */
export function clearServerProblems(control: AbstractControl): void {
  if (control instanceof FormGroup || control instanceof FormArray) {
    for (const child of Object.values(control.controls as Record<string, AbstractControl>)) clearServerProblems(child);
  } else if (control.errors?.['server']) {
    control.updateValueAndValidity();
  }
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
