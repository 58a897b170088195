import { FormGroup } from '@angular/forms';
import { controlPath } from '@shared/field-path';
import type { FieldProblem } from '../core/http/api-error';

/**
 * Puts the server's field errors (problem+json `errors`) on the matching controls so each shows
 * under its field. Returns the messages for fields the form does not have, for a form-level line.
 * A server error clears itself as soon as the person edits the field (Angular re-runs the
 * control's validators, which replaces the errors object).
 */
export function applyServerErrors(form: FormGroup, problems: readonly FieldProblem[]): string[] {
  const unplaced: string[] = [];
  for (const problem of problems) {
    // The server names fields as `regions[1].forecast`; the form's path is `regions.1.forecast`.
    const control = problem.field ? form.get(controlPath(problem.field)) : null;
    if (control) {
      control.setErrors({ ...control.errors, server: problem.message });
      control.markAsTouched();
    } else {
      unplaced.push(problem.field ? `${problem.field}: ${problem.message}` : problem.message);
    }
  }
  return unplaced;
}
