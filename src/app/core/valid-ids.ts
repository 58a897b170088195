import type { CanMatchFn } from '@angular/router';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * Matches a route only when each of its id parameters (`:id`, `:runId`, `:noticeId`…) holds a
 * well-formed id, so a mistyped or cut-off link falls through to "Page not found" instead of
 * opening a page whose request the server refuses as invalid input.
 */
export const validIds: CanMatchFn = (route, segments) => {
  const parts = (route.path ?? '').split('/');
  return parts.every((part, i) => !/^:(id|[a-z]+Id)$/.test(part) || UUID.test(segments[i]?.path ?? ''));
};
