import { idParamSchema, outboxQuerySchema } from '@shared/people';
import type { Config } from '../config';
import { route, type AnyRoute } from '../http/route';
import { listOutbox, readOutboxMessage } from '../services/outbox.service';

/**
 * The mail catcher's messages, for administrators only (they may carry bid receipts). Set-password
 * links are masked unless the installation is a test or demo one (OUTBOX_SHOW_LINKS=1).
 */
export function outboxRoutes(config: Pick<Config, 'outboxShowLinks'>): AnyRoute[] {
  return [
    route({
      method: 'get', path: '/outbox', tag: 'Outbox', access: ['admin'], query: outboxQuerySchema,
      summary: 'Messages received by the local mail catcher, newest first, one page at a time; q searches subject and addresses.',
      handler: ({ em, query }) => listOutbox(em, query),
    }),
    route({
      method: 'get', path: '/outbox/:id', tag: 'Outbox', access: ['admin'], params: idParamSchema,
      summary: 'One message with its text and HTML parts (set-password links masked unless OUTBOX_SHOW_LINKS=1).',
      handler: ({ em, params }) => readOutboxMessage(em, params.id, { showLinks: config.outboxShowLinks }),
    }),
  ];
}
