/** One refused field of a problem file: `field` is a path such as `vendors[2].prices.R07`. */
export interface AwardFieldError {
  field: string;
  message: string;
}

/** The problem file was refused before anything was solved. */
export class AwardInputError extends Error {
  constructor(readonly errors: AwardFieldError[]) {
    super(`The award problem is not valid: ${errors.map((e) => `${e.field || '(problem)'}: ${e.message}`).join('; ')}`);
    this.name = 'AwardInputError';
  }
}
