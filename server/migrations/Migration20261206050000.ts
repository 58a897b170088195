import { Migration } from '@mikro-orm/migrations';

/**
 * One region of an explanation worked out exactly, on demand (issue 14, point 1): `run_region_check`,
 * one per run and region, computed by a job on the solve queue (server/jobs/explain-job.ts) and kept
 * beside the explanation, which stays as first computed. In the form `migration:create` writes, plus
 * a check of its own.
 */
export class Migration20261206050000 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "run_region_check" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "run_id" uuid not null, "region" varchar(64) not null, "status" varchar(10) not null default 'queued', "requested_by_id" uuid not null, "progress_done" int not null default 0, "progress_total" int not null default 0, "result" jsonb null, "error" text null, "started_at" timestamptz null, "computed_at" timestamptz null, "attempts" int not null default 0, constraint "run_region_check_pkey" primary key ("id"));`);
    this.addSql(`alter table "run_region_check" add constraint "run_region_check_run_id_region_unique" unique ("run_id", "region");`);
    this.addSql(`alter table "run_region_check" add constraint "run_region_check_run_id_foreign" foreign key ("run_id") references "run" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "run_region_check" add constraint "run_region_check_requested_by_id_foreign" foreign key ("requested_by_id") references "app_user" ("id") on update cascade on delete restrict;`);
    // Written by hand: the job's states, and a result exactly when done.
    this.addSql(`alter table "run_region_check" add constraint "run_region_check_status_check" check (
      status in ('queued', 'running', 'done', 'failed') and ((status = 'done') = (result is not null)));`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop table if exists "run_region_check" cascade;`);
  }

}
