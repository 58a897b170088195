/**
 * Roles and the signed-in person, free of zod so the client's frame can import them without
 * loading the schema library (see shared/auth.ts for the schemas).
 */
export const ROLES = ['admin', 'buyer', 'compliance', 'vendor'] as const;
export type Role = (typeof ROLES)[number];

/** How each role is named on screen and in e-mails. */
export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Administrator',
  buyer: 'Buyer',
  compliance: 'Compliance officer',
  vendor: 'Vendor',
};

/** The signed-in person as the API returns it. */
export interface SessionUser {
  id: string;
  email: string;
  name: string;
  role: Role;
  vendorOrganisation: { id: string; name: string } | null;
}
