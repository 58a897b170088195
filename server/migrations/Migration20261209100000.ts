import { Migration } from '@mikro-orm/migrations';

/**
 * A tender's count of regions and total forecast on its own row (issue 19, the vendor's tender list):
 * the lists read `tender.region_count` and `tender.total_forecast` instead of counting and summing
 * the regions of every tender they show. PostgreSQL keeps them, in the statement that writes the
 * regions and so in its transaction, whoever writes them (the services, an amendment, the seeds,
 * plain SQL): statement-level triggers recount the tenders whose regions were inserted, updated or
 * deleted. And the index a vendor's list starts from covers the tender's id. The columns and
 * indexes in the form `migration:create` writes; the rest by hand.
 */
export class Migration20261209100000 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "tender" add column "region_count" int not null default 0, add column "total_forecast" numeric not null default 0;`);
    // Written by hand: the totals of the regions there are, in the form the lists computed them
    // (the sum of numeric(16,4) forecasts keeps its four decimals; 0 without regions).
    this.addSql(`update "tender" t set "region_count" = s.n, "total_forecast" = s.forecast
      from (select tender_id, count(*)::int as n, sum(forecast) as forecast from "region" group by tender_id) s
     where t.id = s.tender_id;`);
    this.addSql(`create function region_totals() returns trigger language plpgsql as $$
      begin
        update tender t set region_count = s.n, total_forecast = s.forecast
          from (select c.tender_id, count(r.id)::int as n, coalesce(sum(r.forecast), 0) as forecast
                  from (select distinct tender_id from changed_region) c
                  left join region r on r.tender_id = c.tender_id
                 group by c.tender_id) s
         where t.id = s.tender_id
           and (t.region_count, t.total_forecast) is distinct from (s.n, s.forecast);
        return null;
      end $$;`);
    // One trigger per event: a trigger with a transition table has one event. A region never moves
    // to another tender, so the new rows of an update name every tender it touched.
    this.addSql(`create trigger region_totals_insert after insert on "region" referencing new table as changed_region for each statement execute function region_totals();`);
    this.addSql(`create trigger region_totals_update after update on "region" referencing new table as changed_region for each statement execute function region_totals();`);
    this.addSql(`create trigger region_totals_delete after delete on "region" referencing old table as changed_region for each statement execute function region_totals();`);
    // The lists no longer count regions: the index they did it from goes.
    this.addSql(`drop index "region_tender_id_forecast_index";`);
    // A vendor's list reads its invitations' tenders from the index alone (no heap page per invitation).
    this.addSql(`drop index "invitation_vendor_organisation_id_index";`);
    this.addSql(`create index "invitation_vendor_organisation_id_tender_id_index" on "invitation" ("vendor_organisation_id", "tender_id");`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop index "invitation_vendor_organisation_id_tender_id_index";`);
    this.addSql(`create index "invitation_vendor_organisation_id_index" on "invitation" ("vendor_organisation_id");`);
    this.addSql(`create index "region_tender_id_forecast_index" on "region" ("tender_id") include ("forecast");`);
    this.addSql(`drop trigger region_totals_delete on "region";`);
    this.addSql(`drop trigger region_totals_update on "region";`);
    this.addSql(`drop trigger region_totals_insert on "region";`);
    this.addSql(`drop function region_totals();`);
    this.addSql(`alter table "tender" drop column "region_count", drop column "total_forecast";`);
  }

}
