import { z } from 'zod';

import { ROLES } from './roles';
import { plainText } from './text';


/** The four roles of Tendara. A person has exactly one. */
export const roleSchema = z.enum(ROLES, { error: 'Choose a role.' });

/**
 * Passwords are at least 12 characters (and at most 200, so hashing stays cheap) and more than
 * white space. The server also refuses common passwords (server/auth/common-passwords.ts; the list
 * is too large for the client).
 */
export const PASSWORD_MIN_LENGTH = 12;
export const passwordSchema = z
  .string({ error: 'Password is required.' })
  .min(PASSWORD_MIN_LENGTH, { error: `Password must be at least ${PASSWORD_MIN_LENGTH} characters.` })
  .max(200, { error: 'Password must be at most 200 characters.' })
  .refine((p) => /\S/u.test(p), { error: 'Password must contain more than spaces.' });

/**
 * The one form of an e-mail address Tendara stores, compares and rate-limits by: Unicode NFKC,
 * lower case, no surrounding white space. Every entry (sign-in, invitation, organisation contact)
 * goes through it, so `Ａnna@X.test`, `anna@x.test ` and `ANNA@X.TEST` are one address.
 */
export function normaliseEmail(value: string): string {
  return value.normalize('NFKC').toLowerCase().normalize('NFKC').trim();
}

export const emailSchema = z
  .string({ error: 'E-mail is required.' })
  .max(254, { error: 'E-mail must be at most 254 characters.' })
  .transform(normaliseEmail)
  .pipe(z.string().max(254, { error: 'E-mail must be at most 254 characters.' }).pipe(z.email({ error: 'Enter a valid e-mail address.' })));

/** POST /api/session. The password is not length-checked here: a wrong one gets the same 401. */
export const signInSchema = z.object({
  email: plainText(z.string({ error: 'E-mail is required.' }), 'E-mail').transform(normaliseEmail)
    .pipe(z.string().min(1, { error: 'E-mail is required.' }).max(254, { error: 'E-mail must be at most 254 characters.' })),
  password: z.string({ error: 'Password is required.' }).min(1, { error: 'Password is required.' }).max(200, { error: 'Password must be at most 200 characters.' }),
});
export type SignIn = z.infer<typeof signInSchema>;
