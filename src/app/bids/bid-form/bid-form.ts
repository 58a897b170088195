import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, output, signal, untracked } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { AbstractControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { bidSaveSchema, isLiveBid, type BidSave, type BidView, type TenderView } from '@shared/tenders';
import { startWith } from 'rxjs';
import { ApiError, type FieldProblem } from '../../core/http/api-error';
import { formatInZone } from '@shared/time-zone';
import { formSubmission } from '../../ui/form-submission';
import { hasClosed, localClosingTime, minuteClock } from '../../tenders/closing-time';
import { BID_STATUS_LABELS } from '../../tenders/tender-status';
import { money, quantity } from '../../ui/number-format';
import { whenConfirmed, type ConfirmData } from '../../ui/confirm-dialog';
import { MoneyInput } from '../../ui/money-input';
import { fieldMessage } from '../../ui/zod-validator';
import { BidApi } from '../bid-api';
import { totalAtForecast } from '../bid-total';
import { bidFigures, bidFormGroup, controlFor, fillBid, syncCap, type BidFormGroup } from './bid-fields';
import { controlPath } from '@shared/field-path';
import { DownloadLink } from '../../ui/download-link';
import { ProgressNote } from '../../ui/progress-note';
import type { Transfer } from '../../ui/transfer';
import { ScrollFrame } from '../../ui/scroll-frame';

/** The vendor's bid on one tender: by form or by workbook, saved, submitted, revised or withdrawn. */
@Component({
  selector: 'app-bid-form',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ScrollFrame, DownloadLink, ProgressNote, ReactiveFormsModule, MatFormFieldModule, MatInputModule, MatCheckboxModule, MatButtonModule, MatIconModule, MoneyInput],
  templateUrl: './bid-form.html',
  styleUrl: './bid-form.scss',
  // Closing or reloading the tab with unsaved figures asks first (leaving within the app: the route guard).
  host: { '(window:beforeunload)': 'warnBeforeUnload($event)' },
})
export class BidForm {
  private readonly api = inject(BidApi);
  private readonly dialog = inject(MatDialog);
  private readonly destroyRef = inject(DestroyRef);

  readonly tender = input.required<TenderView>();
  /** The server said bidding has closed: the page reloads the tender. */
  readonly closed = output<void>();

  protected form: BidFormGroup = bidFormGroup([]);
  private readonly formValue = signal(0);
  protected readonly bid = signal<BidView | null>(null);
  protected readonly loaded = signal(false);
  /** Whether the save being checked submits the bid (the schema is checked with what will be sent). */
  private submitting = false;
  protected readonly submission = formSubmission(() => this.form, this.destroyRef, {
    invalidMessage: 'Nothing was saved: some figures need attention; each is marked below.',
    check: () => {
      const parsed = bidSaveSchema.safeParse(this.body(this.submitting));
      return parsed.success ? [] : parsed.error.issues.map((i) => ({ field: controlPath(i.path), message: i.message }));
    },
    place: (problems) => this.place(problems),
  });
  protected readonly busy = this.submission.busy;
  protected readonly status = signal('');
  /** Why the bid could not be loaded, or why it was not saved. */
  protected readonly failure = this.submission.failure;
  protected readonly conflict = signal<string | null>(null);
  protected readonly uploadErrors = signal<FieldProblem[]>([]);
  protected readonly uploading = signal(false);
  /** What the upload is doing: sending (with its percentage), then the server reading the workbook. */
  protected readonly uploadProgress = signal<Transfer<unknown> | null>(null);
  /** The workbook the figures on screen came from; sent with the next save, then forgotten. */
  protected readonly documentId = signal<string | null>(null);
  protected readonly uploadedName = signal<string | null>(null);
  private readonly now = minuteClock();

  protected readonly isClosed = computed(() => {
    const t = this.tender();
    return t.status !== 'open' || hasClosed(t.closesAt, this.now());
  });
  protected readonly removedList = (prices: Record<string, number>) =>
    Object.entries(prices).map(([code, price]) => `${code}: ${price}`).join(', ');
  protected readonly live = computed(() => { const status = this.bid()?.status; return !!status && isLiveBid(status); });
  protected readonly statusText = computed(() => {
    const bid = this.bid();
    return bid ? BID_STATUS_LABELS[bid.status] : 'Not started';
  });
  protected readonly submitLabel = computed(() => ((this.bid()?.revision ?? 0) > 0 ? 'Submit revision' : 'Submit bid'));
  /** The running total counts only figures that pass their checks; those marked in error are left out and counted. */
  protected readonly total = computed(() => {
    this.formValue();
    const t = this.tender();
    const fee = this.form.controls.fixedFee;
    const prices: Record<string, number | null> = {};
    let leftOut = fee.invalid && fee.value !== null ? 1 : 0;
    for (const [code, control] of Object.entries(this.form.controls.prices.controls)) {
      if (control.invalid) leftOut += 1;
      else prices[code] = control.value;
    }
    const sum = totalAtForecast(fee.valid ? fee.value : null, prices, t.regions);
    return { ...sum, leftOut, text: money(sum.total, t.currency), quantityText: quantity(sum.quantity) };
  });
  protected readonly workbookUrl = computed(() => this.api.workbookUrl(this.tender().id));
  protected readonly closingTime = localClosingTime;
  protected readonly fieldMessage = fieldMessage;
  protected readonly quantity = quantity;

  constructor() {
    // A new tender (or its regions) means a new form; the bid is then loaded into it.
    effect(() => {
      const tender = this.tender();
      untracked(() => this.build(tender));
    });
    effect(() => {
      const closed = this.isClosed();
      untracked(() => {
        if (closed) this.form.disable({ emitEvent: false });
        else if (this.form.disabled) {
          this.form.enable({ emitEvent: false });
          syncCap(this.form);
        }
      });
    });
  }

  private build(tender: TenderView): void {
    const codes = Object.keys(this.form.controls.prices.controls).join('|');
    if (this.loaded() && codes === tender.regions.map((r) => r.code).join('|')) {
      if (this.isClosed()) this.form.disable({ emitEvent: false });
      return;
    }
    this.form = bidFormGroup(tender.regions);
    this.form.valueChanges.pipe(startWith(null), takeUntilDestroyed(this.destroyRef)).subscribe(() => this.formValue.update((n) => n + 1));
    this.form.controls.noCap.valueChanges.pipe(takeUntilDestroyed(this.destroyRef)).subscribe(() => syncCap(this.form));
    if (this.isClosed()) this.form.disable({ emitEvent: false });
    this.reload();
  }

  protected reload(): void {
    this.conflict.set(null);
    this.failure.set(null);
    this.api
      .get(this.tender().id)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (bid) => {
          this.bid.set(bid);
          this.documentId.set(null);
          this.uploadedName.set(null);
          if (bid) fillBid(this.form, bid);
          this.form.markAsPristine();
          this.loaded.set(true);
          this.formValue.update((n) => n + 1);
        },
        error: (error: unknown) => this.failure.set(error instanceof ApiError ? error.userMessage : 'Your bid could not be loaded.'),
      });
  }

  protected priceControl(code: string): AbstractControl {
    return this.form.controls.prices.controls[code];
  }

  protected lineValue(code: string, forecast: number): string {
    this.formValue();
    const price: unknown = this.priceControl(code).value;
    return typeof price === 'number' && price > 0 ? money(price * forecast, this.tender().currency) : '—';
  }

  /** Figures typed or read from a workbook that are not saved yet (nothing to lose once bidding closed). */
  unsavedChanges(): boolean {
    return this.form.dirty && !this.isClosed();
  }

  protected warnBeforeUnload(event: BeforeUnloadEvent): void {
    if (this.unsavedChanges()) event.preventDefault();
  }

  private body(submit: boolean) {
    return { ...bidFigures(this.form), submit, version: this.bid()?.version ?? null, documentId: this.documentId() };
  }

  protected save(submit: boolean): void {
    if (this.busy() || this.isClosed()) return;
    this.failure.set(null);
    this.conflict.set(null);
    this.submitting = submit;
    if (!this.submission.validate()) {
      this.status.set('Nothing was saved: some figures need attention.');
      return;
    }
    const body = bidSaveSchema.parse(this.body(submit));
    if (submit) {
      whenConfirmed(this.dialog, this.submitQuestion()).pipe(takeUntilDestroyed(this.destroyRef)).subscribe(() => this.send(body));
    } else {
      this.send(body);
    }
  }

  /** What submitting commits the vendor to, in figures, before it does. */
  private submitQuestion(): ConfirmData {
    const t = this.tender();
    const total = this.total();
    const revision = (this.bid()?.revision ?? 0) + 1;
    return {
      title: revision > 1 ? `Submit revision ${revision}?` : 'Submit your bid?',
      message: `You offer ${total.offered} of ${t.regions.length} regions, ${total.text} at the forecast (fixed fee included). `
        + `Submitted bids are opened at the closing time (${localClosingTime(t.closesAt, t.timeZone)}); until then you can revise or withdraw it. `
        + `After closing your bid stays binding for ${t.bidValidityDays} days.`,
      confirm: revision > 1 ? 'Submit revision' : 'Submit bid',
    };
  }

  private send(body: BidSave): void {
    const submit = body.submit;
    this.submission.run(
      () => this.api.save(this.tender().id, body),
      (bid) => {
        this.bid.set(bid);
        this.documentId.set(null);
        this.uploadedName.set(null);
        this.form.markAsPristine();
        this.status.set(
          submit
            ? `Bid submitted: revision ${bid.revision}. Your receipt commitment is ${bid.digest}. A receipt e-mail is on its way.`
            : 'Draft saved. It is not submitted: buyers will not count it until you submit it.',
        );
      },
      (problem) => this.refused(problem),
    );
  }

  protected withdraw(): void {
    const bid = this.bid();
    if (!bid || this.busy()) return;
    whenConfirmed(this.dialog, {
      title: 'Withdraw your bid?',
      message: `Your bid on ${this.tender().reference} will no longer be considered. You can submit a new one until the closing time (${localClosingTime(this.tender().closesAt, this.tender().timeZone)}).`,
      confirm: 'Withdraw bid',
      destructive: true,
    })
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe(() => {
        this.submission.run(
          () => this.api.withdraw(this.tender().id, bid.version),
          (withdrawn) => {
            this.bid.set(withdrawn);
            this.status.set('Your bid is withdrawn. A receipt e-mail is on its way.');
          },
          (problem) => this.refused(problem),
        );
      });
  }

  protected upload(event: Event): void {
    const input = event.target as HTMLInputElement;
    const file = input.files?.[0];
    input.value = '';
    if (!file || this.isClosed()) return;
    this.uploading.set(true);
    this.uploadProgress.set({ text: `Sending ${file.name}`, percent: 0 });
    this.uploadErrors.set([]);
    this.failure.set(null);
    this.api
      .upload(this.tender().id, file)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (progress) => {
          if (!progress.result) {
            this.uploadProgress.set(progress);
            return;
          }
          const { documentId, bid } = progress.result;
          this.uploading.set(false);
          this.uploadProgress.set(null);
          fillBid(this.form, bid);
          this.form.markAllAsTouched();
          this.form.markAsDirty();
          this.documentId.set(documentId);
          this.uploadedName.set(file.name);
          this.formValue.update((n) => n + 1);
          this.status.set(`The figures of ${file.name} are in the form for your review. Nothing is saved or submitted yet.`);
        },
        error: (error: unknown) => {
          this.uploading.set(false);
          this.uploadProgress.set(null);
          const problem = error instanceof ApiError ? error : null;
          this.uploadErrors.set(
            problem?.fieldErrors.length ? [...problem.fieldErrors] : [{ field: 'file', message: problem?.userMessage ?? 'The workbook could not be read.' }],
          );
          this.status.set(`${file.name} was not read: the problems are listed.`);
        },
      });
  }

  /** After the submission showed a refusal: a conflict (closed, changed elsewhere) has a line of its own. */
  private refused(error: ApiError): void {
    if (error.status === 409) {
      this.failure.set(null);
      this.conflict.set(error.userMessage);
      this.status.set(error.userMessage);
      if (/closed/i.test(error.userMessage)) this.closed.emit();
      return;
    }
    this.status.set(`Not saved: ${error.userMessage}`);
  }

  /** Marks each problem on its input; returns those with no input of their own. */
  private place(problems: readonly FieldProblem[]): string[] {
    const unplaced: string[] = [];
    for (const problem of problems) {
      const control = controlFor(this.form, problem.field);
      if (control) {
        control.setErrors({ ...control.errors, server: problem.message });
        control.markAsTouched();
      } else {
        unplaced.push(problem.message);
      }
    }
    return unplaced;
  }

  protected submittedAt(iso: string): string {
    return formatInZone(iso, this.tender().timeZone, { seconds: true });
  }
}
