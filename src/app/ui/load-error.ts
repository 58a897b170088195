import { ApiError } from '../core/http/api-error';

/**
 * The server's problem behind a failed request or resource, if it answered one: Angular's resources
 * pass an `Error` through and wrap anything else, the original then being the wrapper's `cause`.
 */
export function apiProblem(error: unknown): ApiError | null {
  if (error instanceof ApiError) return error;
  const cause = (error as { cause?: unknown } | null | undefined)?.cause;
  return cause instanceof ApiError ? cause : null;
}

/** What a failed load says to the reader: the server's own message, else `fallback`; null when nothing failed. */
export function loadErrorMessage(error: unknown, fallback: string): string | null {
  if (!error) return null;
  return apiProblem(error)?.userMessage ?? fallback;
}
