import { ROLES, type Role } from '@shared/roles';

/** One entry of the side navigation. */
export interface NavItem {
  label: string;
  /** A Material Symbols ligature. */
  icon: string;
  link: string;
  roles: readonly Role[];
  /** Only "Overview" needs an exact match; other items stay lit on their sub-pages. */
  exact?: boolean;
  /** The home page's link shows how many worklist items wait. */
  showsWorklistCount?: boolean;
}

/**
 * The navigation of every role, in display order. A new area (tenders, bids, awards) adds its
 * entry here next to its route in app.routes.ts.
 */
export const NAV_ITEMS: readonly NavItem[] = [
  { label: 'Overview', icon: 'space_dashboard', link: '/', roles: ROLES, exact: true, showsWorklistCount: true },
  { label: 'Tenders', icon: 'request_quote', link: '/tenders', roles: ['admin', 'buyer', 'compliance'] },
  // Vendors see only the tenders they are invited to, so the label says whose they are.
  { label: 'My tenders', icon: 'request_quote', link: '/tenders', roles: ['vendor'] },
  // A plain envelope: an icon with a dot would read as "unread" whether or not anything is.
  { label: 'Notices', icon: 'mail', link: '/notices', roles: ['admin', 'buyer', 'compliance', 'vendor'] },
  { label: 'People', icon: 'group', link: '/people', roles: ['admin'] },
  // A vendor's own firm: its people, and the contact's approval of new ones.
  { label: 'My organisation', icon: 'domain', link: '/organisation', roles: ['vendor'] },
  { label: 'Outbox', icon: 'outbox', link: '/outbox', roles: ['admin'] },
];

export function navigationFor(role: Role): NavItem[] {
  return NAV_ITEMS.filter((item) => item.roles.includes(role));
}
