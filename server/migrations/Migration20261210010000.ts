import { Migration } from '@mikro-orm/migrations';

/**
 * A draft bid save in one call and one round trip (issue 19, point b): `bid_save_draft`, called by
 * `saveDraftInOneCall` (server/services/queries/bids.queries.ts) as a statement of its own, its own
 * transaction. Written by hand (no entity changes): the same statements as the multi-statement save
 * (`lockTenderForBid`, `lockOwnBid`, `writeBid`), in the same order, each with a snapshot of its
 * own — a VOLATILE PL/pgSQL function under READ COMMITTED takes a fresh one for every statement, so
 * what a decision committed while the save waited for the tender's row lock (an amendment's
 * regions, its number) is seen by the statements after the lock. It decides nothing the service
 * words: it answers an outcome, and the service turns a refusal into its error (naming the field).
 * A refusal returns before any write, so a refused save stores nothing.
 *
 * Outcomes: 'saved' (the row as written), 'not-found' (no such tender, not invited, a draft or
 * unpublished tender), 'closed' (not open, or arrived at or after the closing time; with the tender's
 * status, closing time and zone for the message), 'unknown-codes' (the codes that are no region), 'changed' (the
 * loaded version is not the stored one, or a first save raced another), 'submitted' (a live bid:
 * a draft cannot replace it), 'document' (a workbook is attached: whether the draft keeps it is
 * decided in TypeScript, `keepsDocument`, so the service saves the multi-statement way instead).
 */
export class Migration20261210010000 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create function bid_save_draft(
      p_tender uuid, p_vendor uuid, p_arrived_at timestamptz, p_loaded_version int,
      p_fixed_fee numeric, p_capacity numeric, p_codes text[], p_prices numeric[])
    returns table (
      outcome text, tender_status text, closes_at timestamptz, time_zone text, unknown_codes text[],
      id uuid, status bid_status, revision int, version int, updated_at timestamptz, submitted_at timestamptz,
      answers_amendment int, amendment_note text)
    language plpgsql volatile as $fn$
    #variable_conflict use_column
    declare
      t record;
      own record;
      last_amendment int;
    begin
      -- The tender row FOR SHARE, as lockTenderForBid: bids of many vendors go together, closing waits.
      select tt.status, tt.closes_at, tt.time_zone, tt.published_at is not null as published,
             exists (select 1 from invitation i where i.tender_id = tt.id and i.vendor_organisation_id = p_vendor) as invited
        into t from tender tt where tt.id = p_tender for share;
      if not found or not t.invited or t.status = 'draft' or not t.published then
        outcome := 'not-found'; return next; return;
      end if;
      if t.status <> 'open' or p_arrived_at >= t.closes_at then
        outcome := 'closed'; tender_status := t.status; closes_at := t.closes_at; time_zone := t.time_zone;
        return next; return;
      end if;
      -- From here on every statement sees what was committed before the lock was granted.
      unknown_codes := array(select c.code from unnest(p_codes) as c(code)
                              where not exists (select 1 from region r where r.tender_id = p_tender and r.code = c.code));
      if cardinality(unknown_codes) > 0 then
        outcome := 'unknown-codes'; return next; return;
      end if;
      unknown_codes := null;
      select b.id, b.status, b.version, b.document_id into own
        from bid b where b.tender_id = p_tender and b.vendor_organisation_id = p_vendor for update;
      if own.version is distinct from p_loaded_version then
        outcome := 'changed'; return next; return;
      end if;
      if own.status in ('submitted', 'revised') then
        outcome := 'submitted'; return next; return;
      end if;
      if own.document_id is not null and exists (
        select 1 from bid_document d where d.id = own.document_id and d.tender_id = p_tender and d.vendor_organisation_id = p_vendor) then
        outcome := 'document'; return next; return;
      end if;
      select coalesce(max(a.number), 0)::int into last_amendment from amendment a where a.tender_id = p_tender;
      -- As writeBid with submit = false: a draft keeps the stored submission time, answer and note.
      return query
      with saved as (
        insert into bid as b (id, tender_id, vendor_organisation_id, status, fixed_fee, capacity, submitted_at, digest, nonce, revision, version, answers_amendment, document_id)
        values (gen_random_uuid(), p_tender, p_vendor, 'draft', p_fixed_fee, p_capacity, null, null, null, 0, 1, last_amendment, null)
        on conflict (tender_id, vendor_organisation_id) do update set
          status = excluded.status, fixed_fee = excluded.fixed_fee, capacity = excluded.capacity,
          digest = null, nonce = null, document_id = null,
          version = b.version + 1, updated_at = now()
        where b.version = p_loaded_version
        returning b.id, b.status, b.revision, b.version, b.updated_at, b.submitted_at, b.answers_amendment, b.amendment_note),
      priced as (
        select r.id as region_id, l.unit_price
          from unnest(p_codes, p_prices) as l(code, unit_price) join region r on r.tender_id = p_tender and r.code = l.code),
      upserted as (
        insert into bid_line (id, bid_id, region_id, unit_price)
        select gen_random_uuid(), s.id, p.region_id, p.unit_price
          from saved s cross join priced p
          left join bid_line l on l.bid_id = s.id and l.region_id = p.region_id
         where l.unit_price is distinct from p.unit_price
        on conflict (bid_id, region_id) do update set unit_price = excluded.unit_price, updated_at = now()),
      unpriced as (delete from bid_line l using saved s where l.bid_id = s.id and l.region_id not in (select region_id from priced)),
      removed as (delete from bid_removed_line x using saved s where x.bid_id = s.id)
      select 'saved'::text, null::text, null::timestamptz, null::text, null::text[],
             s.id, s.status, s.revision, s.version, s.updated_at, s.submitted_at, s.answers_amendment, s.amendment_note
        from saved s;
      if not found then
        outcome := 'changed'; return next;
      end if;
    end $fn$;`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop function if exists bid_save_draft(uuid, uuid, timestamptz, int, numeric, numeric, text[], numeric[]);`);
  }

}
