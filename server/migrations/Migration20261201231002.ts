import { Migration } from '@mikro-orm/migrations';

/** Award notices (one per bidder per award) and the locale of a tender's letters. */
export class Migration20261201231002 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create type "notice_kind" as enum ('award', 'regret');`);
    this.addSql(`create type "notice_status" as enum ('queued', 'sent', 'failed');`);
    this.addSql(`create table "notice" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "tender_id" uuid not null, "run_id" uuid not null, "vendor_organisation_id" uuid not null, "kind" "notice_kind" not null, "status" "notice_status" not null default 'queued', "to_addresses" text[] not null, "subject" varchar(300) not null, "html" text not null, "text" text not null, "standstill_ends_at" timestamptz not null, "attempts" int not null default 0, "last_error" text null, "sent_at" timestamptz null, constraint "notice_pkey" primary key ("id"));`);
    this.addSql(`alter table "notice" add constraint "notice_tender_id_vendor_organisation_id_unique" unique ("tender_id", "vendor_organisation_id");`);

    this.addSql(`alter table "notice" add constraint "notice_tender_id_foreign" foreign key ("tender_id") references "tender" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "notice" add constraint "notice_run_id_foreign" foreign key ("run_id") references "run" ("id") on update cascade on delete restrict;`);
    this.addSql(`alter table "notice" add constraint "notice_vendor_organisation_id_foreign" foreign key ("vendor_organisation_id") references "vendor_organisation" ("id") on update cascade on delete restrict;`);

    this.addSql(`alter table "tender" add column "locale" varchar(20) not null default 'en-GB';`);

  }

  override async down(): Promise<void> {
    this.addSql(`drop table if exists "notice" cascade;`);


    this.addSql(`alter table "tender" drop column "locale";`);

    this.addSql(`drop type "notice_kind";`);
    this.addSql(`drop type "notice_status";`);
  }

}
