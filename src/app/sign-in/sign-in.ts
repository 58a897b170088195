import { ChangeDetectionStrategy, Component, inject, input, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router } from '@angular/router';
import { signInSchema } from '@shared/auth';
import { Auth } from '../core/auth/auth';
import { Logo } from '../ui/logo';
import { formSubmission } from '../ui/form-submission';
import { fieldMessage, zodValidator } from '../ui/zod-validator';

/** Only paths inside the app, so a crafted link cannot send someone elsewhere after sign-in. */
function safeReturnUrl(url: string | undefined): string {
  return url && url.startsWith('/') && !url.startsWith('//') ? url : '/';
}

@Component({
  selector: 'app-sign-in',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    ReactiveFormsModule,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    MatIconModule,
    MatProgressBarModule,
    Logo,
  ],
  templateUrl: './sign-in.html',
  styleUrl: './sign-in.scss',
})
export class SignIn {
  private readonly auth = inject(Auth);
  private readonly router = inject(Router);

  /** Query parameters: where to go afterwards, and the notice after a password was set. */
  readonly returnUrl = input<string>();
  readonly passwordSet = input<string>();

  protected readonly form = inject(NonNullableFormBuilder).group({
    email: ['', zodValidator(signInSchema.shape.email)],
    password: ['', zodValidator(signInSchema.shape.password)],
  });
  protected readonly submission = formSubmission(this.form);
  protected readonly showPassword = signal(false);
  protected readonly fieldMessage = fieldMessage;

  protected submit(): void {
    this.submission.send(
      () => this.auth.signIn(signInSchema.parse(this.form.getRawValue())),
      () => void this.router.navigateByUrl(safeReturnUrl(this.returnUrl())),
    );
  }
}
