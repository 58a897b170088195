import { HttpErrorResponse } from '@angular/common/http';
import type { Problem } from '@shared/people';

/** One field the server refused, as listed in a problem+json `errors` array. */
export interface FieldProblem {
  field: string;
  message: string;
}

/**
 * Every failed API call reaches components as an ApiError, whatever the server (or the network)
 * said, so templates can show `detail ?? title` without poking at HttpErrorResponse.
 */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly title: string,
    readonly detail: string | null,
    readonly fieldErrors: readonly FieldProblem[],
  ) {
    super(detail ?? title);
    this.name = 'ApiError';
  }

  /** The sentence to show a person: the detail when the server gave one, else the title. */
  get userMessage(): string {
    return this.detail ?? this.title;
  }
}

function isProblem(body: unknown): body is Problem {
  return typeof body === 'object' && body !== null && typeof (body as Problem).title === 'string';
}

function fieldProblems(body: Problem): FieldProblem[] {
  if (!Array.isArray(body.errors)) return [];
  return body.errors.filter(
    (e): e is FieldProblem => typeof e?.field === 'string' && typeof e?.message === 'string',
  );
}

/** Turns what HttpClient reports into an ApiError with a readable message. */
export function toApiError(response: HttpErrorResponse): ApiError {
  if (response.status === 0) {
    return new ApiError(0, 'The server could not be reached.', 'Check your connection and try again.', []);
  }
  const body: unknown = response.error;
  if (isProblem(body)) {
    return new ApiError(response.status, body.title, body.detail ?? null, fieldProblems(body));
  }
  const title = response.status >= 500 ? 'Something went wrong on the server.' : 'The request was refused.';
  return new ApiError(response.status, title, `Status ${response.status}. Please try again.`, []);
}
