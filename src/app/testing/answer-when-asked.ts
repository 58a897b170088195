import type { HttpRequest } from '@angular/common/http';
import { HttpTestingController, type TestRequest } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { waitFor } from './wait-for';

/** Which request to answer: a URL (a GET of it), method and URL, or a test of the request. */
export type RequestToAnswer = string | { method?: string; url?: string } | ((request: HttpRequest<unknown>) => boolean);

function describe(match: RequestToAnswer): string {
  if (typeof match === 'string') return `GET ${match}`;
  if (typeof match === 'function') return 'the expected request';
  return `${match.method ?? 'a request to'} ${match.url ?? ''}`.trim();
}

/**
 * Answers a request the screen makes only once earlier answers have settled (a resource that
 * depends on another, a reload after a click): `fixture.whenStable()` would wait on that very
 * request, so this renders (`render`, usually `() => fixture.detectChanges()`) and looks for it until
 * it comes, then flushes `body` with `init`'s status. Fails naming the request it waited for.
 */
export async function answerWhenAsked(
  match: RequestToAnswer,
  body: object | null,
  render: () => void = () => undefined,
  init: { status?: number; statusText?: string } = {},
): Promise<TestRequest> {
  const http = TestBed.inject(HttpTestingController);
  const criteria = typeof match === 'string' ? { method: 'GET', url: match } : match;
  const request = await waitFor(`the screen to make ${describe(match)}`, () => {
    render();
    return http.match(criteria)[0];
  });
  request.flush(body, init);
  return request;
}
