import type { PersonView } from '@shared/people';

export type PersonStatus = 'active' | 'pending' | 'awaiting' | 'refused' | 'deactivated';

export const STATUS_LABELS: Record<PersonStatus, string> = {
  active: 'Active',
  pending: 'Invitation pending',
  awaiting: 'Awaiting firm’s approval',
  refused: 'Refused by firm',
  deactivated: 'Deactivated',
};

/**
 * The firm's decision comes first (a person its contact has not approved cannot sign in whatever
 * else holds), then deactivation, then a pending invitation.
 */
export function personStatus(person: PersonView): PersonStatus {
  if (person.membership === 'refused') return 'refused';
  if (person.membership === 'pending') return 'awaiting';
  if (!person.active) return 'deactivated';
  return person.invitationPending ? 'pending' : 'active';
}
