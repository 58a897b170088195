import type { EntityManager } from '@mikro-orm/postgresql';
import type { Pool } from 'pg';
import type { SeenMarkKind } from '../../entities/seen-mark.entity';
import { LIVE_BID_STATUSES } from '@shared/tenders';
import { sqlList } from '../sql';
import { CURRENT_STATUS } from './tender-rows.queries';

/**
 * One row of a worklist, whatever its kind: the tender it is about (if any), its due time and the
 * few figures the sentence needs. The service (worklist.service.ts) turns it into words and a link.
 * Never a bid's figures: before closing a buyer's row carries the count of bids only.
 */
export interface WorklistRow {
  kind: string;
  tender_id: string | null;
  /** The other row the item is about: a notice, a person, a failed mail job. */
  ref_id: string | null;
  reference: string | null;
  title: string | null;
  time_zone: string | null;
  due_at: Date | string | null;
  /** Counts whose meaning depends on the kind (bids so far, questions waiting, entries since…). */
  n: number | null;
  m: number | null;
  /** A short text of the kind's own (an amendment's note, a return comment, a person's name). */
  note: string | null;
  detail: string | null;
  /** Since when it waits (a recommendation's age, a letter's date). */
  since: Date | string | null;
}

/** How soon a closing counts as "closing soon" for buyers and vendors. */
export const CLOSING_SOON_HOURS = 72;

const LIVE = sqlList(LIVE_BID_STATUSES);

/** Every select of the union gives the same columns, in this order. */
const row = (kind: string, c: Partial<Record<Exclude<keyof WorklistRow, 'kind'>, string>>) =>
  `select '${kind}'::text as kind, ${c.tender_id ?? 't.id'}::uuid as tender_id, ${c.ref_id ?? 'null'}::uuid as ref_id,
          ${c.reference ?? 't.reference'}::text as reference, ${c.title ?? 't.title'}::text as title, ${c.time_zone ?? 't.time_zone'}::text as time_zone,
          ${c.due_at ?? 'null'}::timestamptz as due_at, ${c.n ?? 'null'}::int as n, ${c.m ?? 'null'}::int as m,
          ${c.note ?? 'null'}::text as note, ${c.detail ?? 'null'}::text as detail, ${c.since ?? 'null'}::timestamptz as since`;

/**
 * A vendor's worklist ($1 its organisation, $2 the person): invitations with no bid yet, bids an
 * amendment returned to draft, drafts closing within 72 h, clarifications answered since the person
 * last read the tender's clarifications, letters received on tenders still awaiting contracts.
 * Only published tenders its organisation was invited to (as the tender list).
 */
const VENDOR = `with inv as (
    select t.* from tender t
     where t.status <> 'draft' and t.published_at is not null
       and exists (select 1 from invitation i where i.tender_id = t.id and i.vendor_organisation_id = $1)
  ), mine as (
    select t.*, b.status as bid_status, b.amendment_note from inv t
      join bid b on b.tender_id = t.id and b.vendor_organisation_id = $1
     where t.status = 'open' and t.closes_at > now()
  )
  ${row('invitation', { due_at: 't.closes_at' })}
    from inv t
   where t.status = 'open' and t.closes_at > now()
     and not exists (select 1 from bid b where b.tender_id = t.id and b.vendor_organisation_id = $1)
  union all
  ${row('bid-returned', { due_at: 't.closes_at', note: 't.amendment_note' })}
    from mine t where t.bid_status = 'draft' and t.amendment_note is not null
  union all
  ${row('draft-closing', { due_at: 't.closes_at' })}
    from mine t where t.bid_status = 'draft' and t.amendment_note is null and t.closes_at <= now() + interval '${CLOSING_SOON_HOURS} hours'
  union all
  ${row('clarification-answered', { due_at: 't.closes_at', n: 'q.n' })}
    from inv t
    cross join lateral (
      select count(*) as n from question q
       where q.tender_id = t.id and q.status = 'answered'
         and q.answered_at > coalesce((select m.seen_at from seen_mark m where m.user_id = $2 and m.tender_id = t.id and m.kind = 'clarifications'), '-infinity')
    ) q
   where t.status = 'open' and t.closes_at > now() and q.n > 0
  union all
  ${row('letter', { ref_id: 'n.id', due_at: 't.standstill_ends_at', note: 'n.kind::text', since: 'n.sent_at' })}
    from inv t join notice n on n.tender_id = t.id and n.vendor_organisation_id = $1 and n.status = 'sent'
   where t.status in ('awarded', 'notified')`;

/**
 * A buyer's worklist ($1 the buyer: its own tenders only, tender-access.ts `tenderOwnerScope`).
 * Before closing, the bids are counted, never read (sealed).
 */
const BUYER = `with mine as (
    select t.*, ${CURRENT_STATUS} as now_status from tender t where t.created_by_id = $1
  )
  ${row('questions', { due_at: 't.closes_at', n: 'q.n' })}
    from mine t cross join lateral (select count(*) as n from question q where q.tender_id = t.id and q.status = 'asked') q
   where t.now_status = 'open' and q.n > 0
  union all
  ${row('closing-soon', { due_at: 't.closes_at', n: `(select count(*) from bid b where b.tender_id = t.id and b.status in (${LIVE}))` })}
    from mine t where t.now_status = 'open' and t.closes_at <= now() + interval '${CLOSING_SOON_HOURS} hours'
  union all
  ${row('to-evaluate', { n: 'c.unchecked', m: 'c.runs' })}
    from mine t
    cross join lateral (
      select (select count(*) from bid b where b.tender_id = t.id and b.status in (${LIVE}) and b.compliance_decision is null) as unchecked,
             (select count(*) from run r where r.tender_id = t.id and r.parent_id is null) as runs
    ) c
   where t.now_status = 'closed' and (c.unchecked > 0 or c.runs = 0)
     and not exists (select 1 from recommendation r where r.tender_id = t.id and r.status <> 'returned')
  union all
  ${row('returned', { ref_id: 'r.id', note: 'r.comment', detail: 'u.name', since: 'r.decided_at' })}
    from mine t
    join lateral (select * from recommendation r where r.tender_id = t.id order by r.created_at desc limit 1) r on r.status = 'returned'
    left join app_user u on u.id = r.decided_by_id
   where t.now_status = 'closed'
  union all
  ${row('letters-due', { n: 'c.total', m: 'c.sent' })}
    from mine t
    cross join lateral (select count(*) as total, count(*) filter (where n.status = 'sent') as sent from notice n where n.tender_id = t.id) c
   where t.status = 'awarded'
  union all
  ${row('standstill', { due_at: 't.standstill_ends_at' })}
    from mine t where t.status = 'notified' and t.standstill_ends_at > now()
  union all
  ${row('contracts', { due_at: 't.standstill_ends_at', n: 'c.missing', m: 'c.awarded' })}
    from mine t
    cross join lateral (
      select count(*) as awarded,
             count(*) filter (where not exists (select 1 from contract k where k.tender_id = t.id and k.vendor_organisation_id = n.vendor_organisation_id)) as missing
        from notice n where n.tender_id = t.id and n.kind = 'award'
    ) c
   where t.status = 'notified' and t.standstill_ends_at <= now()
  union all
  ${row('draft', { due_at: 't.closes_at' })}
    from mine t where t.status = 'draft'`;

/**
 * A compliance officer's worklist ($1 the person): recommendations awaiting a decision, with who
 * recommended and since when; tenders whose audit trail has entries written after this person last
 * verified it (all of it when never verified). Published tenders only: a draft decides nothing yet.
 */
const COMPLIANCE = `${row('approval', { ref_id: 'r.id', detail: 'u.name', since: 'r.created_at' })}
    from recommendation r join tender t on t.id = r.tender_id left join app_user u on u.id = r.recommended_by_id
   where r.status = 'recommended'
  union all
  ${row('audit-verify', { n: 'a.n', since: 'm.seen_at' })}
    from tender t
    left join seen_mark m on m.user_id = $1 and m.tender_id = t.id and m.kind = 'audit-verified'
    cross join lateral (select count(*) as n from audit_entry e where e.tender_id = t.id and e.at > coalesce(m.seen_at, '-infinity')) a
   where t.status <> 'draft' and a.n > 0`;

/**
 * An administrator's worklist: people invited who have not set a password (the expiry of their
 * newest link), deactivated accounts with a session that has not expired (deactivation deletes
 * them; one left over is worth a look), letters that failed or are being retried with an error,
 * and e-mails the mail queue gave up on.
 */
const ADMIN = `${row('failed-mail', { tender_id: 't.id', ref_id: 'n.id', note: `n.subject || ' (to ' || array_to_string(n.to_addresses, ', ') || ')'`, detail: 'n.last_error', since: 'n.updated_at' })}
    from notice n join tender t on t.id = n.tender_id
   where n.status = 'failed' or (n.status = 'queued' and n.last_error is not null)
  union all
  ${row('failed-mail', { tender_id: 'null', ref_id: 'j.id', reference: 'null', title: 'null', time_zone: 'null', note: `(j.data->>'subject') || ' (to ' || (j.data->>'to') || ')'`, detail: `coalesce(j.output->>'message', j.output::text)`, since: 'j.completed_on' })}
    from pgboss.job j where j.name = 'mail-send' and j.state = 'failed'
  union all
  ${row('deactivated-session', { tender_id: 'null', ref_id: 'u.id', reference: 'null', title: 'null', time_zone: 'null', note: 'u.name', detail: 'u.email', n: 's.n' })}
    from app_user u
    cross join lateral (select count(*) as n from http_session s where s.sess #>> '{passport,user}' = u.id::text and s.expire > now()) s
   where not u.active and s.n > 0
  union all
  ${row('pending-invitation', { tender_id: 'null', ref_id: 'u.id', reference: 'null', title: 'null', time_zone: 'null', note: 'u.name', detail: 'u.email', due_at: 'k.expires_at' })}
    from app_user u
    left join lateral (select max(k.expires_at) as expires_at from account_token k where k.user_id = u.id and k.purpose = 'invitation' and k.used_at is null) k on true
   where u.active and u.membership = 'approved' and u.password_hash is null`;

const ORDER = ` order by kind, due_at asc nulls last, since asc nulls last, reference`;

/**
 * The worklist rows of one person's role, in one named statement (planned once per connection),
 * through the plain pg pool like the tender list. Reads only.
 */
export async function worklistRows(
  pool: Pool,
  who: { role: 'vendor'; vendorOrganisationId: string; userId: string } | { role: 'buyer' | 'compliance'; userId: string } | { role: 'admin' },
): Promise<WorklistRow[]> {
  switch (who.role) {
    case 'vendor':
      return (await pool.query<WorklistRow>({ name: 'worklist-vendor', text: `select * from (${VENDOR}) w${ORDER}`, values: [who.vendorOrganisationId, who.userId] })).rows;
    case 'buyer':
      return (await pool.query<WorklistRow>({ name: 'worklist-buyer', text: `select * from (${BUYER}) w${ORDER}`, values: [who.userId] })).rows;
    case 'compliance':
      return (await pool.query<WorklistRow>({ name: 'worklist-compliance', text: `select * from (${COMPLIANCE}) w${ORDER}`, values: [who.userId] })).rows;
    case 'admin':
      return (await pool.query<WorklistRow>({ name: 'worklist-admin', text: `select * from (${ADMIN}) w${ORDER}`, values: [] })).rows;
  }
}

/** Records that the person has seen the tender's `kind` as of `at` (a later mark never moves back). */
export async function upsertSeenMark(em: EntityManager, userId: string, tenderId: string, kind: SeenMarkKind, at: Date): Promise<void> {
  await em.execute(
    `insert into seen_mark (id, user_id, tender_id, kind, seen_at) values (gen_random_uuid(), ?, ?, ?, ?)
     on conflict (user_id, tender_id, kind) do update set seen_at = greatest(seen_mark.seen_at, excluded.seen_at), updated_at = now()`,
    [userId, tenderId, kind, at],
  );
}
