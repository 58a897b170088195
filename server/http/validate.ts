import type { z } from 'zod';
import { ValidationError, type FieldError } from './errors';
import { fieldPath } from '@shared/field-path';

/** zod issues → field errors with dotted paths (`prices.R07`, `regions[2].code`). */
export function fieldErrors(error: z.ZodError, prefix = ''): FieldError[] {
  return error.issues.map((issue) => {
    const field = fieldPath(issue.path, prefix);
    return { field: field || '(body)', message: issue.message };
  });
}

/** Parses `value` with `schema` or throws a 400 naming each bad field. */
export function parseOr400<S extends z.ZodType>(schema: S, value: unknown, prefix = ''): z.infer<S> {
  const result = schema.safeParse(value);
  if (!result.success) throw new ValidationError(fieldErrors(result.error, prefix));
  return result.data;
}
