import { Migration } from '@mikro-orm/migrations';

/** Tenders, regions, invitations, sealed bids with their lines and uploaded workbooks. */
export class Migration20261201222143 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create type "tender_status" as enum ('draft', 'open', 'closed', 'awarded', 'notified');`);
    this.addSql(`create type "bid_status" as enum ('draft', 'submitted', 'revised', 'withdrawn');`);
    this.addSql(`create table "tender" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "reference" varchar(40) not null, "title" varchar(200) not null, "commodity" varchar(120) not null, "unit" varchar(20) not null, "currency" varchar(3) not null, "closes_at" timestamptz not null, "standstill_days" int not null default 10, "description" text not null default '', "status" "tender_status" not null default 'draft', "created_by_id" uuid not null, "published_at" timestamptz null, "closed_at" timestamptz null, constraint "tender_pkey" primary key ("id"));`);
    this.addSql(`alter table "tender" add constraint "tender_reference_unique" unique ("reference");`);

    this.addSql(`create table "region" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "tender_id" uuid not null, "code" varchar(20) not null, "name" varchar(120) not null, "forecast" numeric(16,4) not null, "position" int not null, constraint "region_pkey" primary key ("id"));`);
    this.addSql(`alter table "region" add constraint "region_tender_id_code_unique" unique ("tender_id", "code");`);

    this.addSql(`create table "invitation" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "tender_id" uuid not null, "vendor_organisation_id" uuid not null, "invited_by_id" uuid not null, "notified_at" timestamptz null, constraint "invitation_pkey" primary key ("id"));`);
    this.addSql(`alter table "invitation" add constraint "invitation_tender_id_vendor_organisation_id_unique" unique ("tender_id", "vendor_organisation_id");`);

    this.addSql(`create table "bid_document" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "tender_id" uuid not null, "vendor_organisation_id" uuid not null, "uploaded_by_id" uuid not null, "filename" varchar(255) not null, "size" int not null, "digest" varchar(64) not null, "content" bytea not null, constraint "bid_document_pkey" primary key ("id"));`);

    this.addSql(`create table "bid" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "tender_id" uuid not null, "vendor_organisation_id" uuid not null, "status" "bid_status" not null default 'draft', "fixed_fee" numeric(16,2) not null, "capacity" numeric(16,4) null, "submitted_at" timestamptz null, "digest" varchar(64) null, "revision" int not null default 0, "version" int not null default 1, "document_id" uuid null, constraint "bid_pkey" primary key ("id"));`);
    this.addSql(`alter table "bid" add constraint "bid_tender_id_vendor_organisation_id_unique" unique ("tender_id", "vendor_organisation_id");`);

    this.addSql(`create table "bid_line" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "bid_id" uuid not null, "region_id" uuid not null, "unit_price" numeric(16,4) not null, constraint "bid_line_pkey" primary key ("id"));`);
    this.addSql(`alter table "bid_line" add constraint "bid_line_bid_id_region_id_unique" unique ("bid_id", "region_id");`);

    this.addSql(`alter table "tender" add constraint "tender_created_by_id_foreign" foreign key ("created_by_id") references "app_user" ("id") on update cascade on delete restrict;`);

    this.addSql(`alter table "region" add constraint "region_tender_id_foreign" foreign key ("tender_id") references "tender" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "invitation" add constraint "invitation_tender_id_foreign" foreign key ("tender_id") references "tender" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "invitation" add constraint "invitation_vendor_organisation_id_foreign" foreign key ("vendor_organisation_id") references "vendor_organisation" ("id") on update cascade on delete restrict;`);
    this.addSql(`alter table "invitation" add constraint "invitation_invited_by_id_foreign" foreign key ("invited_by_id") references "app_user" ("id") on update cascade on delete restrict;`);

    this.addSql(`alter table "bid_document" add constraint "bid_document_tender_id_foreign" foreign key ("tender_id") references "tender" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "bid_document" add constraint "bid_document_vendor_organisation_id_foreign" foreign key ("vendor_organisation_id") references "vendor_organisation" ("id") on update cascade on delete restrict;`);
    this.addSql(`alter table "bid_document" add constraint "bid_document_uploaded_by_id_foreign" foreign key ("uploaded_by_id") references "app_user" ("id") on update cascade on delete restrict;`);

    this.addSql(`alter table "bid" add constraint "bid_tender_id_foreign" foreign key ("tender_id") references "tender" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "bid" add constraint "bid_vendor_organisation_id_foreign" foreign key ("vendor_organisation_id") references "vendor_organisation" ("id") on update cascade on delete restrict;`);
    this.addSql(`alter table "bid" add constraint "bid_document_id_foreign" foreign key ("document_id") references "bid_document" ("id") on update cascade on delete set null;`);

    this.addSql(`alter table "bid_line" add constraint "bid_line_bid_id_foreign" foreign key ("bid_id") references "bid" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "bid_line" add constraint "bid_line_region_id_foreign" foreign key ("region_id") references "region" ("id") on update cascade on delete cascade;`);

  }

  override async down(): Promise<void> {
    this.addSql(`alter table "region" drop constraint "region_tender_id_foreign";`);

    this.addSql(`alter table "invitation" drop constraint "invitation_tender_id_foreign";`);

    this.addSql(`alter table "bid_document" drop constraint "bid_document_tender_id_foreign";`);

    this.addSql(`alter table "bid" drop constraint "bid_tender_id_foreign";`);

    this.addSql(`alter table "bid_line" drop constraint "bid_line_region_id_foreign";`);

    this.addSql(`alter table "bid" drop constraint "bid_document_id_foreign";`);

    this.addSql(`alter table "bid_line" drop constraint "bid_line_bid_id_foreign";`);

    this.addSql(`drop table if exists "tender" cascade;`);

    this.addSql(`drop table if exists "region" cascade;`);

    this.addSql(`drop table if exists "invitation" cascade;`);

    this.addSql(`drop table if exists "bid_document" cascade;`);

    this.addSql(`drop table if exists "bid" cascade;`);

    this.addSql(`drop table if exists "bid_line" cascade;`);

    this.addSql(`drop type "tender_status";`);
    this.addSql(`drop type "bid_status";`);
  }

}
