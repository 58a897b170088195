import { idParamSchema } from '@shared/people';
import { route, type AnyRoute } from '../http/route';
import { listOutbox, readOutboxMessage } from '../services/outbox.service';

/** The mail catcher's messages, for administrators only (they may carry bid receipts). */
export function outboxRoutes(): AnyRoute[] {
  return [
    route({
      method: 'get', path: '/outbox', tag: 'Outbox', access: ['admin'],
      summary: 'Messages received by the local mail catcher, newest first.',
      handler: ({ em }) => listOutbox(em),
    }),
    route({
      method: 'get', path: '/outbox/:id', tag: 'Outbox', access: ['admin'], params: idParamSchema,
      summary: 'One message with its text and HTML parts.',
      handler: ({ em, params }) => readOutboxMessage(em, params.id),
    }),
  ];
}
