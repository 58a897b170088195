import { contractInputSchema } from '@shared/contracts';
import { tenderIdParamSchema } from '@shared/tenders';
import { route, type AnyRoute } from '../http/route';
import { listContracts, recordContract } from '../services/contracts.service';

export function contractRoutes(): AnyRoute[] {
  return [
    route({
      method: 'get', path: '/tenders/:id/contracts', tag: 'Contracts', access: ['buyer', 'compliance', 'admin'], params: tenderIdParamSchema,
      summary: 'The awarded vendors with the award’s schedule and each one’s recorded contract; whether contracts can be recorded yet (standstill over, notices sent).',
      handler: ({ em, user, params }) => listContracts(em, user, params.id),
    }),
    route({
      method: 'post', path: '/tenders/:id/contracts', tag: 'Contracts', access: ['buyer'], params: tenderIdParamSchema, body: contractInputSchema, status: 201,
      summary: 'Record an awarded vendor’s signed contract (signature date after the standstill end, not in the future; the awarded regions with their quantities and unit prices). The last one makes the tender contracted.',
      responses: { 409: 'Standstill running, notices not sent, or this contract is already recorded' },
      handler: ({ em, user, params, body }) => recordContract(em, user, params.id, body),
    }),
  ];
}
