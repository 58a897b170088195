import { z } from 'zod';
import { emailSchema, passwordSchema, roleSchema } from './auth';
import type { Role } from './roles';
import { plainText } from './text';

const uuid = z.uuid({ error: 'Must be a valid id.' });

/** POST /api/users: invite a person. Vendors must name their organisation. */
export const inviteUserSchema = z
  .object({
    name: plainText(z.string({ error: 'Name is required.' }).trim().min(1, { error: 'Name is required.' }).max(120, { error: 'Name must be at most 120 characters.' }), 'Name'),
    email: emailSchema,
    role: roleSchema,
    vendorOrganisationId: uuid.nullish(),
  })
  .superRefine((v, ctx) => {
    if (v.role === 'vendor' && !v.vendorOrganisationId) {
      ctx.addIssue({ code: 'custom', path: ['vendorOrganisationId'], message: 'A vendor must belong to a vendor organisation.' });
    }
    if (v.role !== 'vendor' && v.vendorOrganisationId) {
      ctx.addIssue({ code: 'custom', path: ['vendorOrganisationId'], message: 'Only vendors belong to a vendor organisation.' });
    }
  });
export type InviteUser = z.infer<typeof inviteUserSchema>;

/** POST /api/vendor-organisations */
export const vendorOrganisationSchema = z.object({
  name: plainText(z.string({ error: 'Name is required.' }).trim().min(1, { error: 'Name is required.' }).max(160, { error: 'Name must be at most 160 characters.' }), 'Name'),
  registrationNumber: plainText(z.string({ error: 'Registration number is required.' }).trim().min(1, { error: 'Registration number is required.' }).max(40, { error: 'Registration number must be at most 40 characters.' }), 'Registration number'),
  sme: z.boolean({ error: 'SME must be true or false.' }),
  contactEmail: emailSchema,
});
export type VendorOrganisationInput = z.infer<typeof vendorOrganisationSchema>;

/** POST /api/account-setup/:token */
export const setPasswordSchema = z.object({ password: passwordSchema });

export const idParamSchema = z.object({ id: uuid });
export const tokenParamSchema = z.object({
  token: z.string().regex(/^[A-Za-z0-9_-]{20,100}$/, { error: 'The link is not valid.' }),
});

/**
 * A vendor account's membership of its organisation: `pending` until the organisation's contact
 * approves a person an administrator added (no sign-in, no link until then), `refused` if they refuse.
 */
export type Membership = 'approved' | 'pending' | 'refused';

export interface PersonView {
  id: string;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  /** No password set yet (a fresh invitation link can be sent; a reset cannot). */
  invitationPending: boolean;
  membership: Membership;
  vendorOrganisation: { id: string; name: string } | null;
  createdAt: string;
  lastSignInAt: string | null;
}

export interface VendorOrganisationView {
  id: string;
  name: string;
  registrationNumber: string;
  sme: boolean;
  contactEmail: string;
}

/** GET /api/account-setup/:token: whom the link is for. */
export interface AccountSetupView {
  email: string;
  name: string;
  expiresAt: string;
  /** `invitation`: a first password; `reset`: a new one (every session of the person ends). */
  purpose: 'invitation' | 'reset';
}

/** GET /api/organisation/members: a vendor's own organisation, its people and who decides. */
export interface MemberView {
  organisation: { id: string; name: string };
  /** Whether the signed-in vendor is the contact who approves or refuses new people. */
  youAreContact: boolean;
  contactName: string | null;
  people: { id: string; name: string; email: string; membership: Membership; active: boolean; createdAt: string }[];
}

/** GET /api/outbox?q=&page=&pageSize= — a search over subject and addresses, one page at a time. */
export const outboxQuerySchema = z.object({
  q: plainText(z.string().trim().max(100, { error: 'Search must be at most 100 characters.' }), 'Search').optional(),
  page: z.coerce.number({ error: 'Page must be a whole number from 1.' }).int({ error: 'Page must be a whole number from 1.' })
    .min(1, { error: 'Page must be a whole number from 1.' }).default(1),
  pageSize: z.coerce.number({ error: 'Page size must be a whole number from 1 to 100.' }).int({ error: 'Page size must be a whole number from 1 to 100.' })
    .min(1, { error: 'Page size must be a whole number from 1 to 100.' }).max(100, { error: 'Page size must be a whole number from 1 to 100.' }).default(25),
});
export type OutboxQuery = z.infer<typeof outboxQuerySchema>;

/** GET /api/outbox: one page of the messages that match, newest first, and how many match in all. */
export interface OutboxPage {
  messages: OutboxSummary[];
  total: number;
  page: number;
  pageSize: number;
}

export interface OutboxSummary {
  id: string;
  from: string;
  to: string[];
  subject: string;
  date: string;
  hasHtml: boolean;
}
/** GET /api/outbox/:id */
export interface OutboxMessage extends OutboxSummary {
  text: string;
  html: string | null;
}

/** application/problem+json body (RFC 9457) with Tendara's field list. */
export interface Problem {
  type: string;
  title: string;
  status: number;
  detail?: string;
  errors?: { field: string; message: string }[];
}
