import { DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormArray, FormGroup, type AbstractControl } from '@angular/forms';
import type { Observable } from 'rxjs';
import { ApiError, type FieldProblem } from '../core/http/api-error';
import { applyServerErrors } from './server-errors';

/** What a form adds to the default way of sending (every option may be left out). */
export interface SubmissionOptions {
  /**
   * Problems the controls' own validators do not see (the request's schema over the whole form,
   * duplicate codes…), found after every control is checked again: any one stops the send.
   */
  check?: () => readonly FieldProblem[];
  /** The form-level line when something stops the send before it goes ("Some fields need attention…"). */
  invalidMessage?: string;
  /**
   * Puts problems (the check's and the server's) on their controls and returns those it could not
   * place: for a form whose control paths are not the API's field paths. Default: `applyServerErrors`.
   */
  place?: (problems: readonly FieldProblem[]) => string[];
}

/**
 * The one way a form sends what it holds: nothing while it is already sending or while a field is
 * invalid (every field then shows its message); `busy` while the request is in flight; on a
 * refusal, the server's field errors under their fields and the rest, with the problem's own
 * message, in `failure` for the form-level line. Create it in a field initialiser (it needs the
 * component's injection context): `protected readonly submission = formSubmission(this.form);`, or
 * pass the component's `DestroyRef` for a form made later (one answer form per question). A page
 * that replaces its form (a new tender's regions) passes a function that returns the current one.
 */
export class FormSubmission {
  readonly busy = signal(false);
  readonly failure = signal<string | null>(null);

  constructor(
    private readonly form: FormGroup | (() => FormGroup),
    private readonly destroyRef: DestroyRef,
    private readonly options: SubmissionOptions = {},
  ) {}

  private current(): FormGroup {
    return typeof this.form === 'function' ? this.form() : this.form;
  }

  private place(problems: readonly FieldProblem[]): string[] {
    return this.options.place ? this.options.place(problems) : applyServerErrors(this.current(), problems);
  }

  /**
   * Checks every control again (clearing the server's refusals of the last attempt) and the form's
   * own `check`; when anything fails, marks every field touched, places the check's problems and
   * sets the form-level line (`invalidMessage` and what could not be placed). Returns whether the
   * form may be sent.
   */
  validate(): boolean {
    const form = this.current();
    revalidate(form);
    const problems = this.options.check?.() ?? [];
    if (!form.invalid && !problems.length) return true;
    form.markAllAsTouched();
    const unplaced = this.place(problems);
    if (this.options.invalidMessage || unplaced.length) this.failure.set([this.options.invalidMessage, ...unplaced].filter(Boolean).join(' '));
    return false;
  }

  /**
   * Sends `request()` if the form is valid (`validate`); `done` gets the answer, `refused` (if
   * given) runs after a refusal is shown, with the server's problem, e.g. to reload what another
   * person may have changed. Returns whether it sent.
   */
  send<T>(request: () => Observable<T>, done: (answer: T) => void, refused?: (problem: ApiError) => void): boolean {
    if (this.busy()) return false;
    this.failure.set(null);
    if (!this.validate()) return false;
    return this.run(request, done, refused);
  }

  /**
   * Sends `request()` without checking the fields first: for an action on what the form stands for
   * that does not send its fields (withdrawing a bid), or for a form checked by `validate` before a
   * confirmation. A request that completes without an answer (a confirmation declined) ends `busy`.
   */
  run<T>(request: () => Observable<T>, done: (answer: T) => void, refused?: (problem: ApiError) => void): boolean {
    if (this.busy()) return false;
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
          const unplaced = this.place(error.fieldErrors);
          this.failure.set([error.userMessage, ...unplaced].join(' '));
          refused?.(error);
        },
        complete: () => this.busy.set(false),
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

export function formSubmission(
  form: FormGroup | (() => FormGroup), destroyRef: DestroyRef = inject(DestroyRef), options: SubmissionOptions = {},
): FormSubmission {
  return new FormSubmission(form, destroyRef, options);
}
