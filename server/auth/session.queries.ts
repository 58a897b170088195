import type { Pool } from 'pg';
import type { MembershipState } from '../entities/user.entity';

/** The signed-in person's row, read with the session in the same query (null: none, or deactivated). */
export interface SessionUserRow {
  id: string;
  created_at: string;
  updated_at: string;
  email: string;
  name: string;
  role: string;
  active: boolean;
  membership: MembershipState;
  last_sign_in_at: string | null;
  vendor_organisation: {
    id: string; created_at: string; updated_at: string; name: string; registration_number: string; sme: boolean; contact_email: string;
  } | null;
}

/** A stored session as `sessionWithPerson` reads it. */
export interface SessionRow<S> {
  sess: S;
  expire: Date;
  /** The person the session names, if active and approved (null: none such). */
  person: SessionUserRow | null;
  /** Whether the session names a person at all (signed in). */
  names_person: boolean;
}

/**
 * The session, read with one query that also reads the person it names (only if active and, in a
 * vendor organisation, approved by its contact) and their
 * organisation — the session store read and the user lookup were two round trips on every request
 * (bench:api, phase d). The person is read afresh on every request, so a deactivation, a role
 * change or a password reset that deletes the person's sessions takes effect on the very next one.
 */
const SESSION_WITH_PERSON = `
  select s.sess, s.expire,
         (select to_jsonb(u) - 'password_hash'
                 || jsonb_build_object('vendor_organisation', (select to_jsonb(o) from vendor_organisation o where o.id = u.vendor_organisation_id))
            from app_user u
           where u.id = case when s.sess #>> '{passport,user}' ~ '^[0-9a-fA-F-]{36}$' then (s.sess #>> '{passport,user}')::uuid end
             and u.active and u.membership = 'approved') as person,
         s.sess #>> '{passport,user}' is not null as names_person
    from http_session s
   where s.sid = $1 and s.expire >= now()`;

/** The unexpired session `sid` with its person; a named statement (planned once per connection), read on every request. */
export async function sessionWithPerson<S>(pool: Pool, sid: string): Promise<SessionRow<S> | null> {
  const { rows } = await pool.query<SessionRow<S>>({ name: 'tendara-session-get', text: SESSION_WITH_PERSON, values: [sid] });
  return rows[0] ?? null;
}
