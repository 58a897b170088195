import { Migration } from '@mikro-orm/migrations';

/**
 * A tender's entry in the tender lists, as JSON, on its own row (issue 19, the tender lists):
 * `tender.summary_json` holds the keys of a `TenderSummary` that are the tender's alone (id,
 * reference, title, commodity, unit, currency, closesAt, timeZone, regionCount, totalForecast),
 * written as the lists wrote them with `json_agg` (the same escaping and number text; `closesAt` as
 * JavaScript's `toISOString` writes it), without the braces. The lists add the status as of now and
 * the vendor's own bid's status and join the entries: building each entry's JSON was the larger part
 * of PostgreSQL's CPU for a list (bench:api phase a, measured on the bench data: 183 µs per vendor
 * list with `json_agg`, 123 with the stored entries). A row trigger keeps it, before every insert
 * and update of a tender, whoever writes it (the services, an amendment, the region totals' own
 * update, the seeds, plain SQL). The column in the form `migration:create` writes; the rest by hand.
 */
export class Migration20261211010000 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "tender" add column "summary_json" text not null default '';`);
    this.addSql(`create function tender_summary_json() returns trigger language plpgsql as $$
      begin
        new.summary_json := '"id":' || to_json(new.id)::text
          || ',"reference":' || to_json(new.reference)::text
          || ',"title":' || to_json(new.title)::text
          || ',"commodity":' || to_json(new.commodity)::text
          || ',"unit":' || to_json(new.unit)::text
          || ',"currency":' || to_json(new.currency)::text
          || ',"closesAt":"' || to_char(new.closes_at at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"') || '"'
          || ',"timeZone":' || to_json(new.time_zone)::text
          || ',"regionCount":' || new.region_count::text
          || ',"totalForecast":' || to_json(new.total_forecast)::text;
        return new;
      end $$;`);
    this.addSql(`create trigger tender_summary_json before insert or update on "tender" for each row execute function tender_summary_json();`);
    // Every tender there is: the trigger writes its entry.
    this.addSql(`update "tender" set "summary_json" = '';`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop trigger tender_summary_json on "tender";`);
    this.addSql(`drop function tender_summary_json();`);
    this.addSql(`alter table "tender" drop column "summary_json";`);
  }

}
