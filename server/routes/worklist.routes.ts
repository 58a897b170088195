import { worklistCountSchema, worklistSchema } from '@shared/worklist';
import type { AppDeps } from '../context';
import { route, type AnyRoute } from '../http/route';
import { worklistCount, worklistOf } from '../services/worklist.service';

const EVERYONE = ['admin', 'buyer', 'compliance', 'vendor'] as const;

export function worklistRoutes(deps: AppDeps): AnyRoute[] {
  return [
    route({
      method: 'get', path: '/worklist', tag: 'Worklist', access: EVERYONE, response: worklistSchema,
      summary: "What waits for the signed-in person, by role, in sections with counts: each item says what, why now, its due time and the page that deals with it. A buyer's items are its own tenders; before closing only the count of bids.",
      handler: ({ user }) => worklistOf(deps.sessionPool, user),
    }),
    route({
      method: 'get', path: '/worklist/count', tag: 'Worklist', access: EVERYONE, response: worklistCountSchema,
      summary: 'The number of worklist items, for the navigation.',
      handler: ({ user }) => worklistCount(deps.sessionPool, user),
    }),
  ];
}
