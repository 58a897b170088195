import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { AbstractControl, NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatAutocompleteModule } from '@angular/material/autocomplete';
import { MatRadioModule } from '@angular/material/radio';
import { MatSelectModule } from '@angular/material/select';
import { describeAwardBasis } from '@shared/award-basis';
import { formatInZone } from '@shared/time-zone';
import { Router, RouterLink } from '@angular/router';
import { findDuplicateRegionCodes } from '@shared/bids';
import { LETTER_LOCALES, tenderInputSchema, type TenderView } from '@shared/tenders';
import { startWith } from 'rxjs';
import { ApiError } from '../../core/http/api-error';
import { fieldMessage } from '../../ui/zod-validator';
import { TenderApi } from '../tender-api';
import { quantity } from '../../ui/number-format';
import { clearServerProblems, controlPath, fillForm, formBody, placeProblems, regionGroup, setRegions, tenderForm, zonedInstant } from './tender-form';
import { ProgressNote } from '../../ui/progress-note';
import type { Transfer } from '../../ui/transfer';

/** Every IANA zone the browser knows. */
const ZONES: readonly string[] = Intl.supportedValuesOf('timeZone');

function currencyName(code: string): string | null {
  if (!/^[A-Z]{3}$/.test(code)) return null;
  try {
    const name = new Intl.DisplayNames(undefined, { type: 'currency' }).of(code);
    return name && name !== code ? name : null;
  } catch {
    return null;
  }
}

/** /tenders/new and /tenders/:id/edit — a draft tender and its regions (buyer only). */
@Component({
  selector: 'app-tender-editor',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    ProgressNote,
    ReactiveFormsModule, RouterLink, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule, MatAutocompleteModule, MatRadioModule, MatSelectModule,
  ],
  templateUrl: './tender-editor.html',
  styleUrl: './tender-editor.scss',
})
export class TenderEditor {
  private readonly api = inject(TenderApi);
  private readonly router = inject(Router);
  private readonly fb = inject(NonNullableFormBuilder);
  private readonly destroyRef = inject(DestroyRef);

  /** From the route (/tenders/:id/edit); absent for a new tender. */
  readonly id = input<string>();

  protected readonly form = tenderForm(this.fb);
  protected readonly regions = this.form.controls.regions;
  protected readonly basis = this.form.controls.awardBasis;
  protected readonly body = this.form.controls.buyingBody;
  protected readonly loading = signal(false);
  protected readonly notEditable = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly failure = signal<string | null>(null);
  protected readonly importing = signal(false);
  /** What the import is doing: sending the file, then the server reading it. */
  protected readonly importProgress = signal<Transfer<unknown> | null>(null);
  protected readonly importErrors = signal<{ field: string; message: string }[]>([]);
  protected readonly status = signal('');
  protected readonly fieldMessage = fieldMessage;
  protected readonly letterLocales = LETTER_LOCALES;

  private readonly value = toSignal(this.form.valueChanges.pipe(startWith(null)), { initialValue: null });
  protected readonly currencyHint = computed(() => {
    this.value();
    return currencyName(this.form.controls.currency.value.trim().toUpperCase()) ?? 'Three-letter ISO 4217 code, e.g. EUR.';
  });
  protected readonly totalForecast = computed(() => {
    this.value();
    return quantity(this.regions.controls.reduce((sum, r) => sum + (Number(r.controls.forecast.value) || 0), 0));
  });
  /** Zones matching what is typed (all of them when it is a whole zone name), at most 50. */
  protected readonly zoneOptions = computed(() => {
    this.value();
    const typed = this.form.controls.timeZone.value.trim().toLowerCase();
    const list = !typed || ZONES.some((z) => z.toLowerCase() === typed) ? ZONES : ZONES.filter((z) => z.toLowerCase().includes(typed));
    return list.slice(0, 50);
  });
  protected readonly regionCodes = computed(() => {
    this.value();
    return this.regions.getRawValue().map((r) => r.code.trim()).filter(Boolean);
  });
  protected readonly unitLabel = computed(() => {
    this.value();
    return this.form.controls.unit.value.trim() || 'units';
  });
  /** The sentences vendors will read (the same function as the tender page, workbook and invitation). */
  protected readonly basisPreview = computed(() => {
    this.value();
    const body = formBody(this.form) as { awardBasis: Parameters<typeof describeAwardBasis>[0] };
    return describeAwardBasis(body.awardBasis, { unit: this.unitLabel(), regions: this.regions.getRawValue() });
  });
  /** "Closes Sat 12 Dec 2026, 12:00 GMT (Europe/Dublin)": what vendors will be shown. */
  protected readonly closingPreview = computed(() => {
    this.value();
    const v = this.form.getRawValue();
    const at = zonedInstant(v.closesDate, v.closesTime, v.timeZone);
    return at ? `Vendors will see: closes ${formatInZone(at, v.timeZone)}.` : null;
  });

  constructor() {
    effect(() => {
      const id = this.id();
      if (id) this.load(id);
    });
  }

  private load(id: string): void {
    this.loading.set(true);
    this.api
      .get(id)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (tender: TenderView) => {
          this.loading.set(false);
          if (tender.status !== 'draft') {
            this.notEditable.set(`${tender.reference} is published; a published tender can no longer be edited.`);
            this.form.disable();
          }
          fillForm(this.fb, this.form, tender);
        },
        error: (error: unknown) => {
          this.loading.set(false);
          this.failure.set(error instanceof ApiError ? error.userMessage : 'The tender could not be loaded.');
        },
      });
  }

  protected closingMessage(): string | null {
    const control = this.form.controls.closesDate;
    const server: unknown = control.errors?.['server'];
    if (typeof server === 'string') return server;
    const error: unknown = this.form.errors?.['closing'];
    return typeof error === 'string' && (control.touched || this.form.controls.closesTime.touched) ? error : null;
  }

  protected regionsMessage(): string | null {
    const errors = this.regions.errors;
    if (!errors) return null;
    return fieldMessage(this.regions);
  }

  protected message(control: AbstractControl): string | null {
    return control.invalid && control.touched ? fieldMessage(control) : null;
  }

  protected addRegion(): void {
    this.regions.push(regionGroup(this.fb));
    this.status.set(`Region ${this.regions.length} added.`);
    // Put the keyboard in the new row's first input.
    setTimeout(() => document.getElementById(`region-code-${this.regions.length - 1}`)?.focus());
  }

  protected removeRegion(index: number): void {
    const code = this.regions.at(index).controls.code.value;
    this.regions.removeAt(index);
    this.status.set(`Region ${index + 1}${code ? ` (${code})` : ''} removed.`);
  }

  protected importFile(event: Event): void {
    const input = event.target as HTMLInputElement;
    const file = input.files?.[0];
    input.value = '';
    if (!file) return;
    this.importing.set(true);
    this.importProgress.set({ text: `Sending ${file.name}`, percent: 0 });
    this.importErrors.set([]);
    this.api
      .importRegions(file)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (progress) => {
          if (!progress.result) {
            this.importProgress.set(progress);
            return;
          }
          const { regions } = progress.result;
          this.importing.set(false);
          this.importProgress.set(null);
          setRegions(this.fb, this.regions, regions);
          this.status.set(`${regions.length} regions imported from ${file.name}. Check them, then save.`);
        },
        error: (error: unknown) => {
          this.importing.set(false);
          this.importProgress.set(null);
          if (error instanceof ApiError && error.fieldErrors.length) {
            this.importErrors.set([...error.fieldErrors]);
            this.status.set(`${file.name} was not imported: ${error.fieldErrors.length} problems are listed.`);
          } else {
            this.importErrors.set([{ field: 'file', message: error instanceof ApiError ? error.userMessage : 'The file could not be read.' }]);
          }
        },
      });
  }

  protected save(): void {
    if (this.busy() || this.form.disabled) return;
    this.failure.set(null);
    clearServerProblems(this.form);
    const parsed = tenderInputSchema.safeParse(formBody(this.form));
    const duplicates = findDuplicateRegionCodes(this.regions.getRawValue());
    if (this.form.invalid || !parsed.success || duplicates.length) {
      this.form.markAllAsTouched();
      const issues = parsed.success ? [] : parsed.error.issues.map((i) => ({ field: controlPath(i.path), message: i.message }));
      // A control its own validator refuses already says why in the form's terms (a share in %, not the API's fraction).
      const unplaced = placeProblems(this.form, [
        ...issues.filter((i) => i.field !== 'closesDate' && !this.form.get(i.field)?.errors),
        ...duplicates.map((d) => ({ field: `regions.${d.index}.code`, message: d.message })),
      ]);
      this.failure.set(['Some fields need attention; each is marked below.', ...unplaced].join(' '));
      return;
    }
    this.busy.set(true);
    const id = this.id();
    (id ? this.api.update(id, parsed.data) : this.api.create(parsed.data))
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (tender) => void this.router.navigate(['/tenders', tender.id]),
        error: (error: unknown) => {
          this.busy.set(false);
          if (!(error instanceof ApiError)) throw error;
          const unplaced = placeProblems(this.form, error.fieldErrors);
          this.failure.set([error.userMessage, ...unplaced].join(' '));
        },
      });
  }
}
