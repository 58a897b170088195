import { AbstractControl, ValidationErrors, ValidatorFn } from '@angular/forms';
import type { ZodType } from 'zod';

/**
 * The forms' validators come from the same zod schemas in shared/ that the server applies, so
 * a message shown under a field is the message the server would send.
 *
 * An error is reported as `{ zod: message }`; a refusal from the server, mapped back by
 * applyServerErrors, as `{ server: message }`.
 */
export function zodValidator(schema: ZodType): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const result = schema.safeParse(control.value);
    return result.success ? null : { zod: result.error.issues[0]?.message ?? 'Not valid.' };
  };
}

/**
 * For a rule that looks at several fields (a vendor must have an organisation): runs the whole
 * object schema on the parent group's value and keeps the issues about `field` only.
 * Call `updateValueAndValidity()` on this control when a field it depends on changes.
 */
export function zodFieldOf(schema: ZodType, field: string): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const parent = control.parent;
    if (!parent) return null;
    const result = schema.safeParse(parent.getRawValue());
    if (result.success) return null;
    const issue = result.error.issues.find((i) => i.path.length > 0 && String(i.path[0]) === field);
    return issue ? { zod: issue.message } : null;
  };
}

/** The message to show under a control, or null when it is valid (or not yet touched). */
export function fieldMessage(control: AbstractControl): string | null {
  const errors = control.errors;
  if (!errors) return null;
  if (typeof errors['server'] === 'string') return errors['server'];
  if (typeof errors['zod'] === 'string') return errors['zod'];
  return 'Not valid.';
}
