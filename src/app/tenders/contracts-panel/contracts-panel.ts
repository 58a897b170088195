import { ChangeDetectionStrategy, Component, computed, inject, input, output, type OnInit } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { FormArray, FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { contractInputSchema, contractLineSchema, type AwardedContractView, type ContractsView } from '@shared/contracts';
import type { TenderView } from '@shared/tenders';
import { formatInZone } from '@shared/time-zone';
import { Auth } from '../../core/auth/auth';
import { formSubmission } from '../../ui/form-submission';
import { money } from '../../ui/number-format';
import { fieldMessage, zodValidator } from '../../ui/zod-validator';
import { ContractsApi } from './contracts-api';

/** One awarded vendor's contract form: signature date and the schedule, pre-filled from the award. */
@Component({
  selector: 'app-contract-form',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule],
  template: `
    <form [formGroup]="form" (ngSubmit)="submit()" novalidate [attr.aria-label]="'Contract of ' + awarded().vendor.name">
      <div class="form-error" role="alert">
        @if (failure(); as message) {
          <mat-icon aria-hidden="true">error</mat-icon><span>{{ message }}</span>
        }
      </div>
      <mat-form-field appearance="outline" subscriptSizing="dynamic">
        <mat-label>Signature date</mat-label>
        <input matInput type="date" formControlName="signedOn" required [min]="earliest()" />
        <mat-hint>On or after {{ earliest() }}, not in the future.</mat-hint>
        @if (fieldMessage(form.controls.signedOn); as m) {
          <mat-error>{{ m }}</mat-error>
        }
      </mat-form-field>
      <table class="schedule">
        <caption>Schedule of {{ awarded().vendor.name }} (quantities may differ from the forecast)</caption>
        <thead><tr><th scope="col">Region</th><th scope="col">Quantity ({{ unit() }})</th><th scope="col">Unit price ({{ currency() }})</th></tr></thead>
        <tbody formArrayName="lines">
          @for (row of form.controls.lines.controls; track $index; let i = $index) {
            <tr [formGroupName]="i">
              <th scope="row">{{ awarded().awarded[i].regionName }} ({{ awarded().awarded[i].region }})</th>
              <td>
                <mat-form-field appearance="outline" subscriptSizing="dynamic">
                  <mat-label>Quantity, {{ awarded().awarded[i].region }}</mat-label>
                  <input matInput type="number" min="0" formControlName="quantity" required />
                  @if (fieldMessage(row.controls.quantity); as m) {
                    <mat-error>{{ m }}</mat-error>
                  }
                </mat-form-field>
              </td>
              <td>
                <mat-form-field appearance="outline" subscriptSizing="dynamic">
                  <mat-label>Unit price, {{ awarded().awarded[i].region }}</mat-label>
                  <input matInput type="number" min="0" formControlName="unitPrice" required />
                  @if (fieldMessage(row.controls.unitPrice); as m) {
                    <mat-error>{{ m }}</mat-error>
                  }
                </mat-form-field>
              </td>
            </tr>
          }
        </tbody>
      </table>
      <button mat-flat-button type="submit" [disabled]="busy()">{{ busy() ? 'Recording…' : 'Record contract' }}</button>
    </form>
  `,
  styleUrl: './contract-form.scss',
})
export class ContractForm implements OnInit {
  private readonly api = inject(ContractsApi);
  readonly tenderId = input.required<string>();
  readonly awarded = input.required<AwardedContractView>();
  readonly earliest = input.required<string>();
  readonly unit = input.required<string>();
  readonly currency = input.required<string>();
  readonly recorded = output<ContractsView>();
  protected readonly fieldMessage = fieldMessage;

  protected readonly form = new FormGroup({
    signedOn: new FormControl('', { nonNullable: true, validators: zodValidator(contractInputSchema.shape.signedOn) }),
    lines: new FormArray<FormGroup<{ quantity: FormControl<number | null>; unitPrice: FormControl<number | null> }>>([]),
  });
  private readonly submission = formSubmission(this.form);
  protected readonly busy = this.submission.busy;
  protected readonly failure = this.submission.failure;

  ngOnInit(): void {
    for (const l of this.awarded().awarded) {
      this.form.controls.lines.push(new FormGroup({
        quantity: new FormControl<number | null>(l.quantity, zodValidator(contractLineSchema.shape.quantity)),
        unitPrice: new FormControl<number | null>(l.unitPrice, zodValidator(contractLineSchema.shape.unitPrice)),
      }));
    }
  }

  protected submit(): void {
    const v = this.form.getRawValue();
    this.submission.send(
      () => this.api.record(this.tenderId(), {
        vendorId: this.awarded().vendor.id, signedOn: v.signedOn,
        lines: v.lines.map((l, i) => ({ region: this.awarded().awarded[i].region, quantity: Number(l.quantity), unitPrice: Number(l.unitPrice) })),
      }),
      (view) => this.recorded.emit(view),
    );
  }
}

/**
 * The contract step on the tender page (buyer records, compliance and admin read): after the
 * standstill, each awarded vendor's signed contract; until then, why the award is pending.
 */
@Component({
  selector: 'app-contracts-panel',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatIconModule, MatButtonModule, ContractForm],
  template: `
    @if (view(); as v) {
      <section aria-labelledby="contracts-title">
        <h2 id="contracts-title">Contracts</h2>
        @if (v.standstillEndsAt) {
          <p>Standstill period {{ v.open || v.status === 'contracted' ? 'ended' : 'ends' }} <strong>{{ inZone(v.standstillEndsAt) }}</strong>.</p>
        }
        @if (v.waiting; as waiting) {
          <p class="pending" role="status"><mat-icon aria-hidden="true">{{ v.status === 'contracted' ? 'task_alt' : 'hourglass_top' }}</mat-icon>{{ waiting }}</p>
        }
        <p class="caution">
          Record each contract once it is signed. When a contract may be signed, and in what form, follow your procurement rules
          and the law that applies to this tender; a challenge during the standstill may suspend signing.
        </p>
        <ul class="vendors">
          @for (a of v.vendors; track a.vendor.id) {
            <li>
              <h3>{{ a.vendor.name }}</h3>
              @if (a.contract; as c) {
                <p>Signed on <strong>{{ c.signedOn }}</strong>; recorded by {{ c.recordedBy.name }}.</p>
                <table class="schedule">
                  <caption class="visually-hidden">Contract schedule of {{ a.vendor.name }}</caption>
                  <thead><tr><th scope="col">Region</th><th scope="col" class="num">Quantity ({{ tender().unit }})</th><th scope="col" class="num">Unit price</th></tr></thead>
                  <tbody>
                    @for (l of c.lines; track l.region) {
                      <tr><th scope="row">{{ l.regionName }} ({{ l.region }})</th><td class="num">{{ l.quantity }}</td><td class="num">{{ money(l.unitPrice, tender().currency) }}</td></tr>
                    }
                  </tbody>
                </table>
              } @else if (v.open && isBuyer() && v.earliestSignedOn) {
                <app-contract-form [tenderId]="tender().id" [awarded]="a" [earliest]="v.earliestSignedOn" [unit]="tender().unit" [currency]="tender().currency" (recorded)="recorded($event)" />
              } @else {
                <p class="secondary">Not recorded yet.</p>
              }
            </li>
          }
        </ul>
      </section>
    }
  `,
  styleUrl: './contracts-panel.scss',
})
export class ContractsPanel {
  private readonly api = inject(ContractsApi);
  private readonly auth = inject(Auth);
  readonly tender = input.required<TenderView>();
  /** The tender moved on (contracted): the page reloads it. */
  readonly changed = output<string>();
  protected readonly isBuyer = computed(() => this.auth.user()?.role === 'buyer');
  protected readonly money = money;
  private readonly contracts = rxResource({
    params: () => (['awarded', 'notified', 'contracted'].includes(this.tender().status) ? this.tender().id : undefined),
    stream: ({ params }) => this.api.list(params),
  });
  protected readonly view = computed(() => (this.contracts.hasValue() ? this.contracts.value() : null));

  protected inZone(iso: string): string {
    return formatInZone(iso, this.tender().timeZone, { locale: this.tender().locale });
  }

  protected recorded(view: ContractsView): void {
    this.contracts.set(view);
    this.changed.emit(view.status === 'contracted' ? 'Every contract is recorded: the tender is contracted.' : 'Contract recorded.');
  }
}
