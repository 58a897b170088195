import { Migration } from '@mikro-orm/migrations';

/**
 * Failed sign-in counters shared by every web process (server/http/rate-limit-store.ts); the index
 * a vendor's tender list starts from (its invitations), and one that lets tender lists count and sum
 * each tender's regions without reading the region rows.
 */
export class Migration20261202170000 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "rate_limit_hit" ("key" varchar(400) not null, "hits" int not null, "reset_at" timestamptz not null, constraint "rate_limit_hit_pkey" primary key ("key"));`);
    this.addSql(`create index "rate_limit_hit_reset_at_index" on "rate_limit_hit" ("reset_at");`);
    this.addSql(`create index "invitation_vendor_organisation_id_index" on "invitation" ("vendor_organisation_id");`);
    this.addSql(`create index "region_tender_id_forecast_index" on "region" ("tender_id") include ("forecast");`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop index if exists "region_tender_id_forecast_index";`);
    this.addSql(`drop index if exists "invitation_vendor_organisation_id_index";`);
    this.addSql(`drop table if exists "rate_limit_hit" cascade;`);
  }

}
