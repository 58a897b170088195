import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { rxResource, takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
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
import { LETTER_LOCALES, tenderInputSchema } from '@shared/tenders';
import { startWith } from 'rxjs';
import { ApiError } from '../../core/http/api-error';
import { formSubmission } from '../../ui/form-submission';
import { loadErrorMessage } from '../../ui/load-error';
import { fieldMessage } from '../../ui/zod-validator';
import { TenderApi } from '../tender-api';
import { quantity } from '../../ui/number-format';
import { controlPath, fillForm, formBody, placeProblems, regionGroup, setRegions, tenderForm, zonedInstant } from './tender-form';
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
  /** The draft being edited (none for a new tender). */
  private readonly tender = rxResource({ params: () => this.id(), stream: ({ params: id }) => this.api.get(id) });
  protected readonly notEditable = computed(() => {
    const tender = this.tender.hasValue() ? this.tender.value() : null;
    return tender && tender.status !== 'draft' ? `${tender.reference} is published; a published tender can no longer be edited.` : null;
  });
  protected readonly submission = formSubmission(this.form, this.destroyRef, {
    invalidMessage: 'Some fields need attention; each is marked below.',
    check: () => this.problemsBeforeSending(),
    place: (problems) => placeProblems(this.form, problems),
  });
  protected readonly busy = this.submission.busy;
  /** Why the draft could not be loaded, else why it was not saved. */
  protected readonly failure = computed(() => loadErrorMessage(this.tender.error(), 'The tender could not be loaded.') ?? this.submission.failure());
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
      const tender = this.tender.hasValue() ? this.tender.value() : null;
      if (!tender) return;
      untracked(() => {
        if (tender.status !== 'draft') this.form.disable();
        fillForm(this.fb, this.form, tender);
      });
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

  /**
   * What the request's schema refuses that no control's own validator does, and duplicate region
   * codes. A control its own validator refuses already says why in the form's terms (a share in %,
   * not the API's fraction).
   */
  private problemsBeforeSending(): { field: string; message: string }[] {
    const parsed = tenderInputSchema.safeParse(formBody(this.form));
    const issues = parsed.success ? [] : parsed.error.issues.map((i) => ({ field: controlPath(i.path), message: i.message }));
    return [
      ...issues.filter((i) => i.field !== 'closesDate' && !this.form.get(i.field)?.errors),
      ...findDuplicateRegionCodes(this.regions.getRawValue()).map((d) => ({ field: `regions.${d.index}.code`, message: d.message })),
    ];
  }

  protected save(): void {
    if (this.form.disabled) return;
    const id = this.id();
    this.submission.send(
      () => {
        const body = tenderInputSchema.parse(formBody(this.form));
        return id ? this.api.update(id, body) : this.api.create(body);
      },
      (tender) => void this.router.navigate(['/tenders', tender.id]),
    );
  }
}
