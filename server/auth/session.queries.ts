import type { Pool } from 'pg';
import type { MembershipState } from '../entities/user.entity';

/** The signed-in person's row, read with the session in the same query (times in ms since the epoch). */
export interface SessionUserRow {
  id: string;
  created_at: number;
  updated_at: number;
  email: string;
  name: string;
  role: string;
  active: boolean;
  membership: MembershipState;
  last_sign_in_at: number | null;
  vendor_organisation: {
    id: string; created_at: number; updated_at: number; name: string; registration_number: string; sme: boolean; contact_email: string;
  } | null;
}

/** A stored session as `sessionWithPerson` reads it. */
export interface SessionRow<S> {
  sess: S;
  /** The stored expiry, in ms since the epoch. */
  expireMs: number;
  /** The person the session names, if active and approved (null: none such). */
  person: SessionUserRow | null;
  /** Whether the session names a person at all (signed in). */
  namesPerson: boolean;
}

/** The statement's row: the person's and organisation's columns side by side (null when none). */
interface FlatRow<S> {
  sess: S;
  expire_ms: number;
  names_person: boolean;
  id: string | null;
  email: string;
  name: string;
  role: string;
  active: boolean;
  membership: MembershipState;
  created_ms: number;
  updated_ms: number;
  last_sign_in_ms: number | null;
  org_id: string | null;
  org_name: string;
  org_registration_number: string;
  org_sme: boolean;
  org_contact_email: string;
  org_created_ms: number;
  org_updated_ms: number;
}

/**
 * The session, read with one query that also reads the person it names (only if active and, in a
 * vendor organisation, approved by its contact) and their organisation — the session store read
 * and the user lookup were two round trips on every request (bench:api, phase d). The person is
 * read afresh on every request, so a deactivation, a role change or a password reset that deletes
 * the person's sessions takes effect on the very next one.
 *
 * Plain columns, times as float8 milliseconds: building the person as jsonb, then parsing it and
 * its timestamps in the web process, was garbage on every signed-in request (profiled, phase d).
 */
const PERSON_COLUMNS = `
         u.id, u.email, u.name, u.role, u.active, u.membership,
         (extract(epoch from u.created_at) * 1000)::float8 as created_ms,
         (extract(epoch from u.updated_at) * 1000)::float8 as updated_ms,
         (extract(epoch from u.last_sign_in_at) * 1000)::float8 as last_sign_in_ms,
         o.id as org_id, o.name as org_name, o.registration_number as org_registration_number, o.sme as org_sme,
         o.contact_email as org_contact_email,
         (extract(epoch from o.created_at) * 1000)::float8 as org_created_ms,
         (extract(epoch from o.updated_at) * 1000)::float8 as org_updated_ms`;

/** The session by id, unexpired, with its person (active and approved) and their organisation. */
const SESSION_AND_PERSON = `
    from http_session s
    left join app_user u
      on u.id = s.person_id
     and u.active and u.membership = 'approved'
    left join vendor_organisation o on o.id = u.vendor_organisation_id
   where s.sid = $1 and s.expire >= now()`;

const SESSION_WITH_PERSON = `
  select s.sess, (extract(epoch from s.expire) * 1000)::float8 as expire_ms,
         s.names_person,${PERSON_COLUMNS}${SESSION_AND_PERSON}`;

/**
 * The read path's statement (session-read.ts): of the stored session only the cookie's lifetime and
 * the XSRF token, not the whole JSON to parse in the web process on every request (profiled, phase d).
 */
const SESSION_FOR_READ = `
  select s.max_age, s.xsrf,
         (extract(epoch from s.expire) * 1000)::float8 as expire_ms,
         s.names_person,${PERSON_COLUMNS}${SESSION_AND_PERSON}`;

/** The unexpired session `sid` with its person; a named statement (planned once per connection), read on every request. */
export async function sessionWithPerson<S>(pool: Pool, sid: string): Promise<SessionRow<S> | null> {
  const { rows } = await pool.query<FlatRow<S>>({ name: 'tendara-session-get', text: SESSION_WITH_PERSON, values: [sid] });
  const r = rows[0];
  return r ? { sess: r.sess, expireMs: r.expire_ms, person: personOf(r), namesPerson: r.names_person } : null;
}

/** What the read path takes of a stored session (`sessionForRead`). */
export interface SessionReadRow {
  /** The session cookie's lifetime (`cookie.originalMaxAge`), null when it has none. */
  maxAge: number | null;
  /** The XSRF token bound at sign-in, if any. */
  xsrf: string | undefined;
  expireMs: number;
  person: SessionUserRow | null;
  namesPerson: boolean;
}

/** `sessionWithPerson` for the read path: the same session and person, without the session's JSON. */
export async function sessionForRead(pool: Pool, sid: string): Promise<SessionReadRow | null> {
  const { rows } = await pool.query<Omit<FlatRow<never>, 'sess'> & { max_age: number | null; xsrf: string | null }>(
    { name: 'tendara-session-read', text: SESSION_FOR_READ, values: [sid] },
  );
  const r = rows[0];
  return r ? { maxAge: r.max_age, xsrf: r.xsrf ?? undefined, expireMs: r.expire_ms, person: personOf(r), namesPerson: r.names_person } : null;
}

/** A read that goes with the session's (`sessionForReadWith`). */
export interface ReadWithSession {
  name: string;
  /**
   * A select over the session's row `s` (the columns of the read path's statement: the person's
   * `id`, `role`, `org_id`…; no row when the session is gone or expired), run as a lateral join on
   * it, so it sees exactly the session and person the request is checked against. Its columns must
   * not share a name with the session's.
   */
  text: string;
  /** Its parameters; the first is the session id (`$1`), which the session's read uses. */
  values: unknown[];
  /**
   * It writes (`writesWithSession`): its row reaches the route also when the session then goes
   * through the writer (a session due to slide), since what it wrote is written.
   */
  writes?: boolean;
}

/** The texts of `sessionForReadWith` by name. */
const withSessionTexts = new Map<string, string>();

/** What `sessionForReadWith` answers: the session, the other read's row, and whether it was a write. */
export interface ReadWithSessionRow {
  session: SessionReadRow;
  row: Record<string, unknown>;
  writes: boolean;
}

/**
 * `sessionForRead` and another read in one statement, one round trip (`ReadWithSession`): the
 * session as `sessionForRead` reads it and the other read's first row (its columns by name, all
 * null when it gave none), or null without a session.
 */
export async function sessionForReadWith(pool: Pool, sid: string, other: ReadWithSession): Promise<ReadWithSessionRow | null> {
  if (other.values[0] !== sid) throw new Error(`sessionForReadWith: ${other.name} must take the session id as $1`);
  let text = withSessionTexts.get(other.name);
  if (text === undefined) {
    text = `with s as materialized (${SESSION_FOR_READ})
  select s.max_age as "s.max_age", s.xsrf as "s.xsrf", s.expire_ms as "s.expire_ms", s.names_person as "s.names_person",
         s.id as "s.id", s.email as "s.email", s.name as "s.name", s.role as "s.role", s.active as "s.active",
         s.membership as "s.membership", s.created_ms as "s.created_ms", s.updated_ms as "s.updated_ms",
         s.last_sign_in_ms as "s.last_sign_in_ms", s.org_id as "s.org_id", s.org_name as "s.org_name",
         s.org_registration_number as "s.org_registration_number", s.org_sme as "s.org_sme",
         s.org_contact_email as "s.org_contact_email", s.org_created_ms as "s.org_created_ms", s.org_updated_ms as "s.org_updated_ms",
         x.*
    from s left join lateral (${other.text}) x on true`;
    withSessionTexts.set(other.name, text);
  }
  const { rows } = await pool.query<Record<string, unknown>>({ name: `tendara-session-with-${other.name}`, text, values: other.values });
  const r = rows[0];
  if (!r) return null;
  const flat: Record<string, unknown> = {};
  const row: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(r)) {
    if (k.startsWith('s.')) flat[k.slice(2)] = v;
    else row[k] = v;
  }
  const f = flat as unknown as Omit<FlatRow<never>, 'sess'> & { max_age: number | null; xsrf: string | null };
  return {
    session: { maxAge: f.max_age, xsrf: f.xsrf ?? undefined, expireMs: f.expire_ms, person: personOf(f), namesPerson: f.names_person },
    row,
    writes: other.writes === true,
  };
}

function personOf(r: Omit<FlatRow<unknown>, 'sess'>): SessionUserRow | null {
  return r.id === null ? null : {
    id: r.id, created_at: r.created_ms, updated_at: r.updated_ms, email: r.email, name: r.name, role: r.role,
    active: r.active, membership: r.membership, last_sign_in_at: r.last_sign_in_ms,
    vendor_organisation: r.org_id === null ? null : {
      id: r.org_id, created_at: r.org_created_ms, updated_at: r.org_updated_ms, name: r.org_name,
      registration_number: r.org_registration_number, sme: r.org_sme, contact_email: r.org_contact_email,
    },
  };
}
