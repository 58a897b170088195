import { ChangeDetectionStrategy, Component, inject, input } from '@angular/core';
import { rxResource, takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { AbstractControl, NonNullableFormBuilder, ReactiveFormsModule, ValidationErrors } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { PASSWORD_MIN_LENGTH } from '@shared/auth';
import { setPasswordSchema } from '@shared/people';
import { Logo } from '../ui/logo';
import { formSubmission } from '../ui/form-submission';
import { fieldMessage, zodValidator } from '../ui/zod-validator';
import { AccountSetupApi } from './account-setup-api';
import { apiProblem, loadErrorMessage } from '../ui/load-error';
import { DateTimePipe } from '../ui/date-time.pipe';

/** A typing slip is caught here; the server only ever sees one password. */
function sameAsPassword(control: AbstractControl): ValidationErrors | null {
  const password: unknown = control.parent?.get('password')?.value;
  return control.value === password ? null : { zod: 'The two passwords are not the same.' };
}

/** /account-setup/:token — the page an invitation e-mail links to. */
@Component({
  selector: 'app-account-setup',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    ReactiveFormsModule,
    RouterLink,
    DateTimePipe,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    MatIconModule,
    MatProgressBarModule,
    Logo,
  ],
  templateUrl: './account-setup.html',
  styleUrl: '../sign-in/sign-in.scss',
})
export class AccountSetup {
  private readonly api = inject(AccountSetupApi);
  private readonly router = inject(Router);

  /** Route parameter. */
  readonly token = input.required<string>();

  protected readonly invitation = rxResource({
    params: () => this.token(),
    stream: ({ params }) => this.api.find(params),
  });
  protected readonly form = inject(NonNullableFormBuilder).group({
    password: ['', zodValidator(setPasswordSchema.shape.password)],
    confirm: ['', sameAsPassword],
  });
  protected readonly submission = formSubmission(this.form);
  protected readonly minLength = PASSWORD_MIN_LENGTH;
  protected readonly fieldMessage = fieldMessage;

  constructor() {
    this.form.controls.password.valueChanges
      .pipe(takeUntilDestroyed())
      .subscribe(() => this.form.controls.confirm.updateValueAndValidity({ emitEvent: false }));
  }

  protected invitationProblem(): string {
    const error = this.invitation.error();
    if (apiProblem(error)?.status === 404) {
      return 'This link is unknown, already used or expired. Ask your administrator to send a new invitation.';
    }
    return loadErrorMessage(error, 'The invitation could not be loaded.') ?? '';
  }

  protected submit(): void {
    this.submission.send(
      () => this.api.setPassword(this.token(), this.form.controls.password.value),
      () => void this.router.navigate(['/sign-in'], { queryParams: { passwordSet: 1 } }),
    );
  }
}
