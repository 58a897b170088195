import { Migration } from '@mikro-orm/migrations';

/**
 * "Why this award" and the debrief (issue 14): `run_explanation`, one per run, computed by a job on
 * the solve queue (server/jobs/explain-job.ts) and cached. Written by `migration:create`, without
 * the drops of the hand-written check constraints it cannot see, plus a check of its own.
 */
export class Migration20261204010000 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create table "run_explanation" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "run_id" uuid not null, "status" varchar(10) not null default 'queued', "requested_by_id" uuid not null, "progress_done" int not null default 0, "progress_total" int not null default 0, "result" jsonb null, "error" text null, "started_at" timestamptz null, "computed_at" timestamptz null, "attempts" int not null default 0, constraint "run_explanation_pkey" primary key ("id"));`);
    this.addSql(`alter table "run_explanation" add constraint "run_explanation_run_id_unique" unique ("run_id");`);
    this.addSql(`alter table "run_explanation" add constraint "run_explanation_run_id_foreign" foreign key ("run_id") references "run" ("id") on update cascade on delete cascade;`);
    this.addSql(`alter table "run_explanation" add constraint "run_explanation_requested_by_id_foreign" foreign key ("requested_by_id") references "app_user" ("id") on update cascade on delete restrict;`);
    // Written by hand: the job's states, and a result exactly when done.
    this.addSql(`alter table "run_explanation" add constraint "run_explanation_status_check" check (
      status in ('queued', 'running', 'done', 'failed') and ((status = 'done') = (result is not null)));`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop table if exists "run_explanation" cascade;`);
  }

}
