import { z } from 'zod';

import { ROLES } from './roles';
import { plainText } from './text';

export { ROLES, ROLE_LABELS, type Role, type SessionUser } from './roles';

/** The four roles of Tendara. A person has exactly one. */
export const roleSchema = z.enum(ROLES, { error: 'Choose a role.' });

/** Passwords are at least 12 characters (and at most 200, so hashing stays cheap). */
export const PASSWORD_MIN_LENGTH = 12;
export const passwordSchema = z
  .string({ error: 'Password is required.' })
  .min(PASSWORD_MIN_LENGTH, { error: `Password must be at least ${PASSWORD_MIN_LENGTH} characters.` })
  .max(200, { error: 'Password must be at most 200 characters.' });

export const emailSchema = z
  .string({ error: 'E-mail is required.' })
  .trim()
  .max(254, { error: 'E-mail must be at most 254 characters.' })
  .pipe(z.email({ error: 'Enter a valid e-mail address.' }));

/** POST /api/session. The password is not length-checked here: a wrong one gets the same 401. */
export const signInSchema = z.object({
  email: plainText(z.string({ error: 'E-mail is required.' }).trim().min(1, { error: 'E-mail is required.' }).max(254, { error: 'E-mail must be at most 254 characters.' }), 'E-mail'),
  password: z.string({ error: 'Password is required.' }).min(1, { error: 'Password is required.' }).max(200, { error: 'Password must be at most 200 characters.' }),
});
export type SignIn = z.infer<typeof signInSchema>;
