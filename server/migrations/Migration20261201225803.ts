import { Migration } from '@mikro-orm/migrations';

/** Evaluation: scenarios, runs and their award rows, recommendations, and the chained audit trail. */
export class Migration20261201225803 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create type "built_in_scenario" as enum ('split', 'sole');`);
    this.addSql(`create type "run_status" as enum ('queued', 'solving', 'optimal', 'feasible', 'infeasible', 'failed', 'cancelled');`);
    this.addSql(`create type "recommendation_status" as enum ('recommended', 'approved', 'returned');`);
    this.addSql(`create table "scenario" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "tender_id" uuid not null, "name" varchar(120) not null, "rules" jsonb not null, "time_limit_seconds" int not null default 60, "built_in" "built_in_scenario" null, "created_by_id" uuid null, constraint "scenario_pkey" primary key ("id"));`);
    this.addSql(`alter table "scenario" add constraint "scenario_tender_id_name_unique" unique ("tender_id", "name");`);

    this.addSql(`create table "run" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "tender_id" uuid not null, "scenario_id" uuid not null, "status" "run_status" not null default 'queued', "requested_by_id" uuid not null, "started_at" timestamptz null, "finished_at" timestamptz null, "time_limit_seconds" int not null, "problem" jsonb not null, "input_digest" varchar(64) not null, "result" jsonb null, "attempts" int not null default 0, "parent_id" uuid null, "dropped_vendor" uuid null, constraint "run_pkey" primary key ("id"));`);
    this.addSql(`create index "run_tender_id_created_at_index" on "run" ("tender_id", "created_at");`);

    this.addSql(`create table "recommendation" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "tender_id" uuid not null, "run_id" uuid not null, "status" "recommendation_status" not null default 'recommended', "justification" text not null, "recommended_by_id" uuid not null, "decided_by_id" uuid null, "decided_at" timestamptz null, "comment" text null, constraint "recommendation_pkey" primary key ("id"));`);

    this.addSql(`create table "audit_entry" ("seq" bigserial primary key, "at" timestamptz not null, "tender_id" uuid null, "actor_id" uuid null, "action" varchar(80) not null, "subject" varchar(200) not null, "detail" jsonb not null, "before_digest" varchar(64) null, "after_digest" varchar(64) null, "prev_hash" varchar(64) not null, "hash" varchar(64) not null);`);
    this.addSql(`create index "audit_entry_tender_id_seq_index" on "audit_entry" ("tender_id", "seq");`);

    this.addSql(`create table "run_award" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "run_id" uuid not null, "vendor_organisation_id" uuid not null, "region_code" varchar(20) not null, "quantity" numeric(18,6) not null, "unit_price" numeric(16,4) not null, "cost" numeric(20,4) not null, constraint "run_award_pkey" primary key ("id"));`);
    this.addSql(`create index "run_award_run_id_index" on "run_award" ("run_id");`);

    this.addSql(`alter table "scenario" add constraint "scenario_tender_id_foreign" foreign key ("tender_id") references "tender" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "scenario" add constraint "scenario_created_by_id_foreign" foreign key ("created_by_id") references "app_user" ("id") on update cascade on delete restrict;`);

    this.addSql(`alter table "run" add constraint "run_tender_id_foreign" foreign key ("tender_id") references "tender" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "run" add constraint "run_scenario_id_foreign" foreign key ("scenario_id") references "scenario" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "run" add constraint "run_requested_by_id_foreign" foreign key ("requested_by_id") references "app_user" ("id") on update cascade on delete restrict;`);
    this.addSql(`alter table "run" add constraint "run_parent_id_foreign" foreign key ("parent_id") references "run" ("id") on update cascade on delete cascade;`);

    this.addSql(`alter table "recommendation" add constraint "recommendation_tender_id_foreign" foreign key ("tender_id") references "tender" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "recommendation" add constraint "recommendation_run_id_foreign" foreign key ("run_id") references "run" ("id") on update cascade on delete restrict;`);
    this.addSql(`alter table "recommendation" add constraint "recommendation_recommended_by_id_foreign" foreign key ("recommended_by_id") references "app_user" ("id") on update cascade on delete restrict;`);
    this.addSql(`alter table "recommendation" add constraint "recommendation_decided_by_id_foreign" foreign key ("decided_by_id") references "app_user" ("id") on update cascade on delete restrict;`);

    this.addSql(`alter table "audit_entry" add constraint "audit_entry_tender_id_foreign" foreign key ("tender_id") references "tender" ("id") on update cascade on delete restrict;`);
    this.addSql(`alter table "audit_entry" add constraint "audit_entry_actor_id_foreign" foreign key ("actor_id") references "app_user" ("id") on update cascade on delete restrict;`);

    this.addSql(`alter table "run_award" add constraint "run_award_run_id_foreign" foreign key ("run_id") references "run" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "run_award" add constraint "run_award_vendor_organisation_id_foreign" foreign key ("vendor_organisation_id") references "vendor_organisation" ("id") on update cascade on delete restrict;`);

    // Written by hand: the audit trail is append-only, whoever connects.
    this.addSql(`create function audit_entry_append_only() returns trigger language plpgsql as $$ begin raise exception 'the audit trail is append-only'; end $$;`);
    this.addSql(`create trigger audit_entry_no_change before update or delete on "audit_entry" for each row execute function audit_entry_append_only();`);
    // At most one live (recommended or approved) recommendation per tender.
    this.addSql(`create unique index "recommendation_live_unique" on "recommendation" ("tender_id") where status <> 'returned';`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop trigger if exists audit_entry_no_change on "audit_entry";`);
    this.addSql(`drop function if exists audit_entry_append_only();`);
    this.addSql(`alter table "run" drop constraint "run_scenario_id_foreign";`);

    this.addSql(`alter table "run" drop constraint "run_parent_id_foreign";`);

    this.addSql(`alter table "recommendation" drop constraint "recommendation_run_id_foreign";`);

    this.addSql(`alter table "run_award" drop constraint "run_award_run_id_foreign";`);

    this.addSql(`drop table if exists "scenario" cascade;`);

    this.addSql(`drop table if exists "run" cascade;`);

    this.addSql(`drop table if exists "recommendation" cascade;`);

    this.addSql(`drop table if exists "audit_entry" cascade;`);

    this.addSql(`drop table if exists "run_award" cascade;`);

    this.addSql(`drop type "built_in_scenario";`);
    this.addSql(`drop type "run_status";`);
    this.addSql(`drop type "recommendation_status";`);
  }

}
