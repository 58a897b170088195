/** A field-level validation message, as sent in problem+json `errors`. */
export interface FieldError {
  field: string;
  message: string;
}

/** Every error the API answers on purpose. The error handler turns it into problem+json. */
export class AppError extends Error {
  constructor(
    readonly status: number,
    readonly title: string,
    readonly detail?: string,
    readonly errors?: FieldError[],
  ) {
    super(detail ?? title);
  }
}

export class ValidationError extends AppError {
  constructor(errors: FieldError[], detail = 'Some fields are not valid.') {
    super(400, 'Invalid request', detail, errors);
  }
}
export class UnauthorizedError extends AppError {
  constructor(detail = 'Sign in to continue.') {
    super(401, 'Not signed in', detail);
  }
}
export class ForbiddenError extends AppError {
  constructor(detail = 'Your role does not allow this.') {
    super(403, 'Not allowed', detail);
  }
}
export class NotFoundError extends AppError {
  constructor(what = 'The resource') {
    super(404, 'Not found', `${what} was not found.`);
  }
}
export class ConflictError extends AppError {
  constructor(detail: string, errors?: FieldError[]) {
    super(409, 'Conflict', detail, errors);
  }
}
