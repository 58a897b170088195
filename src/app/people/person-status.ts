import type { PersonView } from '@shared/people';

export type PersonStatus = 'active' | 'pending' | 'deactivated';

export const STATUS_LABELS: Record<PersonStatus, string> = {
  active: 'Active',
  pending: 'Invitation pending',
  deactivated: 'Deactivated',
};

/** Deactivation wins over a pending invitation: a deactivated person cannot sign in either way. */
export function personStatus(person: PersonView): PersonStatus {
  if (!person.active) return 'deactivated';
  return person.invitationPending ? 'pending' : 'active';
}
