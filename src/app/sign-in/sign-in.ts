import { ChangeDetectionStrategy, Component, DestroyRef, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router } from '@angular/router';
import { signInSchema } from '@shared/auth';
import { Auth } from '../core/auth/auth';
import { ApiError } from '../core/http/api-error';
import { Logo } from '../ui/logo';
import { applyServerErrors } from '../ui/server-errors';
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
  private readonly destroyRef = inject(DestroyRef);

  /** Query parameters: where to go afterwards, and the notice after a password was set. */
  readonly returnUrl = input<string>();
  readonly passwordSet = input<string>();

  protected readonly form = inject(NonNullableFormBuilder).group({
    email: ['', zodValidator(signInSchema.shape.email)],
    password: ['', zodValidator(signInSchema.shape.password)],
  });
  protected readonly busy = signal(false);
  protected readonly failure = signal<string | null>(null);
  protected readonly showPassword = signal(false);
  protected readonly fieldMessage = fieldMessage;

  protected submit(): void {
    if (this.busy()) return;
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    this.failure.set(null);
    this.auth
      .signIn(signInSchema.parse(this.form.getRawValue()))
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: () => void this.router.navigateByUrl(safeReturnUrl(this.returnUrl())),
        error: (error: unknown) => {
          this.busy.set(false);
          if (error instanceof ApiError) {
            const unplaced = applyServerErrors(this.form, error.fieldErrors);
            this.failure.set([error.userMessage, ...unplaced].join(' '));
          } else {
            this.failure.set('Sign-in failed. Please try again.');
          }
        },
      });
  }
}
