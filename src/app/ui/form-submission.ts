import { DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormArray, FormGroup, type AbstractControl } from '@angular/forms';
import type { Observable } from 'rxjs';
import { ApiError } from '../core/http/api-error';
import { applyServerErrors } from './server-errors';

/**
 * The one way a form sends what it holds: nothing while it is already sending or while a field is
 * invalid (every field then shows its message); `busy` while the request is in flight; on a
 * refusal, the server's field errors under their fields and the rest, with the problem's own
 * message, in `failure` for the form-level line. Create it in a field initialiser (it needs the
 * component's injection context): `protected readonly submission = formSubmission(this.form);`, or
 * pass the component's `DestroyRef` for a form made later (one answer form per question).
 */
export class FormSubmission {
  readonly busy = signal(false);
  readonly failure = signal<string | null>(null);

  constructor(
    private readonly form: FormGroup,
    private readonly destroyRef: DestroyRef,
  ) {}

  /**
   * Sends `request()` if the form is valid; `done` gets the answer, `refused` (if given) runs after
   * a refusal is shown, e.g. to reload what another person may have changed. Returns whether it sent.
   */
  send<T>(request: () => Observable<T>, done: (answer: T) => void, refused?: () => void): boolean {
    if (this.busy()) return false;
    revalidate(this.form);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return false;
    }
    this.busy.set(true);
    this.failure.set(null);
    request()
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: (answer) => {
          this.busy.set(false);
          done(answer);
        },
        error: (error: unknown) => {
          this.busy.set(false);
          if (!(error instanceof ApiError)) throw error;
          const unplaced = applyServerErrors(this.form, error.fieldErrors);
          this.failure.set([error.userMessage, ...unplaced].join(' '));
          refused?.();
        },
      });
    return true;
  }
}

/**
 * Runs every control's validators again, leaves first: a status can be stale (a rule that reads
 * another field, or the validator of a field a template has just removed), and a new attempt also
 * clears the server's refusals of the last one.
 */
function revalidate(control: AbstractControl): void {
  if (control instanceof FormGroup || control instanceof FormArray) {
    for (const child of Object.values(control.controls as Record<string, AbstractControl>)) revalidate(child);
  }
  control.updateValueAndValidity({ onlySelf: true, emitEvent: false });
}

export function formSubmission(form: FormGroup, destroyRef: DestroyRef = inject(DestroyRef)): FormSubmission {
  return new FormSubmission(form, destroyRef);
}
