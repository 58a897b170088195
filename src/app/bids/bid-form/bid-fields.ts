import { AbstractControl, FormControl, FormGroup, ValidationErrors, ValidatorFn } from '@angular/forms';
import { byCode, capacitySchema, fixedFeeSchema, recordByCode, unitPriceSchema } from '@shared/bids';
import type { BidView, RegionView } from '@shared/tenders';
import { zodValidator } from '../../ui/zod-validator';

export type PriceGroup = FormGroup<Record<string, FormControl<number | null>>>;

/** A blank price means "not offered"; anything typed must be a valid unit price. */
const optionalPrice: ValidatorFn = (control: AbstractControl): ValidationErrors | null => {
  if (control.value === null || control.value === '') return null;
  const result = unitPriceSchema.safeParse(control.value);
  return result.success ? null : { zod: result.error.issues[0]?.message ?? 'Not valid.' };
};

/** The cap is required unless "No cap" is ticked (then the input is disabled and skipped). */
const capacityValidator: ValidatorFn = (control: AbstractControl): ValidationErrors | null => {
  if (control.value === null || control.value === '') return { zod: 'Enter your capacity cap, or tick “No cap”.' };
  const result = capacitySchema.safeParse(control.value);
  return result.success ? null : { zod: result.error.issues[0]?.message ?? 'Not valid.' };
};

export function bidFormGroup(regions: readonly RegionView[]) {
  // Angular's FormGroup needs an ordinary object; fromEntries keeps every code an own key.
  const prices: Record<string, FormControl<number | null>> = Object.fromEntries(
    regions.map((region) => [region.code, new FormControl<number | null>(null, optionalPrice)]),
  );
  return new FormGroup({
    fixedFee: new FormControl<number | null>(null, zodValidator(fixedFeeSchema)),
    noCap: new FormControl(false, { nonNullable: true }),
    capacity: new FormControl<number | null>(null, capacityValidator),
    prices: new FormGroup(prices),
  });
}
export type BidFormGroup = ReturnType<typeof bidFormGroup>;

/** Puts figures (a saved bid, or a workbook just read) into the form. */
export function fillBid(form: BidFormGroup, figures: Pick<BidView, 'fixedFee' | 'capacity' | 'prices'>): void {
  const prices = recordByCode<number | null>();
  for (const code of Object.keys(form.controls.prices.controls)) prices[code] = byCode(figures.prices, code) ?? null;
  form.patchValue({ fixedFee: figures.fixedFee, noCap: figures.capacity === null, capacity: figures.capacity, prices });
  syncCap(form);
}

/** "No cap" disables the cap input so it is neither validated nor sent. */
export function syncCap(form: BidFormGroup): void {
  const cap = form.controls.capacity;
  if (form.controls.noCap.value) {
    cap.setValue(null, { emitEvent: false });
    cap.disable({ emitEvent: false });
  } else if (form.enabled) {
    cap.enable({ emitEvent: false });
  }
}

/** The figures as the server takes them: blank prices left out, no cap as null. */
export function bidFigures(form: BidFormGroup): { fixedFee: number | null; capacity: number | null; prices: Record<string, number> } {
  const v = form.getRawValue();
  const prices = recordByCode<number>();
  for (const [code, price] of Object.entries(v.prices)) {
    if (typeof price === 'number' && !Number.isNaN(price)) prices[code] = price;
  }
  return { fixedFee: v.fixedFee, capacity: v.noCap ? null : v.capacity, prices };
}

/** The control a server or schema field path names: fixedFee, capacity or prices.<code>. */
export function controlFor(form: BidFormGroup, field: string): AbstractControl | null {
  if (field.startsWith('prices.')) return byCode(form.controls.prices.controls, field.slice('prices.'.length)) ?? null;
  if (field === 'fixedFee') return form.controls.fixedFee;
  if (field === 'capacity') return form.controls.capacity;
  return null;
}
