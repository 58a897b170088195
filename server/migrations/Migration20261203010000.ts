import { Migration } from '@mikro-orm/migrations';

/**
 * The procedure before closing: clarification questions and answers, numbered amendments, the
 * prices of regions an amendment removed (kept for the receipts that commit to them), the
 * amendment a bid answers and the note an amendment left on it, and cancellation (tender status
 * `cancelled`, with when and why).
 */
export class Migration20261203010000 extends Migration {

  override async up(): Promise<void> {
    // A new enum value cannot be used in the transaction that adds it; nothing here uses it.
    await this.execute(`alter type "tender_status" add value if not exists 'cancelled'`);
    await this.execute(`alter table "tender" add column "cancelled_at" timestamptz null, add column "cancellation_reason" text null;`);
    await this.execute(`alter table "bid" add column "answers_amendment" int not null default 0, add column "amendment_note" text null;`);

    await this.execute(`create type "question_status" as enum ('asked', 'answered');`);
    await this.execute(`create table "question" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(),
      "tender_id" uuid not null, "vendor_organisation_id" uuid not null, "asked_by_id" uuid not null, "text" text not null,
      "status" "question_status" not null default 'asked', "number" int null, "answer" text null, "answered_at" timestamptz null, "answered_by_id" uuid null,
      constraint "question_pkey" primary key ("id"));`);
    await this.execute(`alter table "question" add constraint "question_tender_id_number_unique" unique ("tender_id", "number");`);
    await this.execute(`create index "question_tender_id_created_at_index" on "question" ("tender_id", "created_at");`);
    await this.execute(`alter table "question" add constraint "question_tender_id_foreign" foreign key ("tender_id") references "tender" ("id") on update cascade on delete cascade;`);
    await this.execute(`alter table "question" add constraint "question_vendor_organisation_id_foreign" foreign key ("vendor_organisation_id") references "vendor_organisation" ("id") on update cascade on delete restrict;`);
    await this.execute(`alter table "question" add constraint "question_asked_by_id_foreign" foreign key ("asked_by_id") references "app_user" ("id") on update cascade on delete restrict;`);
    await this.execute(`alter table "question" add constraint "question_answered_by_id_foreign" foreign key ("answered_by_id") references "app_user" ("id") on update cascade on delete restrict;`);
    // Hand-written: an answered question has its number, answer and time; an open one none of them.
    await this.execute(`alter table "question" add constraint "question_answered_check" check ((status = 'answered') = (number is not null and answer is not null and answered_at is not null));`);

    await this.execute(`create table "amendment" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(),
      "tender_id" uuid not null, "number" int not null, "reason" text not null, "changes" jsonb not null, "issued_by_id" uuid not null,
      constraint "amendment_pkey" primary key ("id"));`);
    await this.execute(`alter table "amendment" add constraint "amendment_tender_id_number_unique" unique ("tender_id", "number");`);
    await this.execute(`alter table "amendment" add constraint "amendment_tender_id_foreign" foreign key ("tender_id") references "tender" ("id") on update cascade on delete cascade;`);
    await this.execute(`alter table "amendment" add constraint "amendment_issued_by_id_foreign" foreign key ("issued_by_id") references "app_user" ("id") on update cascade on delete restrict;`);

    await this.execute(`create table "bid_removed_line" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(),
      "bid_id" uuid not null, "region_code" varchar(20) not null, "region_name" varchar(120) not null, "unit_price" numeric(16,4) not null, "amendment_number" int not null,
      constraint "bid_removed_line_pkey" primary key ("id"));`);
    await this.execute(`alter table "bid_removed_line" add constraint "bid_removed_line_bid_id_region_code_unique" unique ("bid_id", "region_code");`);
    await this.execute(`alter table "bid_removed_line" add constraint "bid_removed_line_bid_id_foreign" foreign key ("bid_id") references "bid" ("id") on update cascade on delete cascade;`);
  }

  override async down(): Promise<void> {
    await this.execute(`drop table if exists "bid_removed_line", "amendment", "question";`);
    await this.execute(`drop type if exists "question_status";`);
    await this.execute(`alter table "bid" drop column "answers_amendment", drop column "amendment_note";`);
    await this.execute(`alter table "tender" drop column "cancelled_at", drop column "cancellation_reason";`);
    // PostgreSQL cannot drop an enum value: a cancelled tender would have to be moved first.
    await this.execute(`update "tender" set "status" = 'closed' where "status" = 'cancelled';`);
  }
}
