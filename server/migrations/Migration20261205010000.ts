import { Migration } from '@mikro-orm/migrations';

/**
 * The worklist's "since you last looked" (issue 18, point 1): `seen_mark`, one row per person,
 * tender and kind (`clarifications` read by a vendor, `audit-verified` by a compliance officer),
 * moved forward by the reads themselves.
 */
export class Migration20261205010000 extends Migration {

  override async up(): Promise<void> {
    await this.execute(`create table "seen_mark" (
      "id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(),
      "user_id" uuid not null, "tender_id" uuid not null, "kind" varchar(20) not null, "seen_at" timestamptz not null,
      constraint "seen_mark_pkey" primary key ("id"));`);
    await this.execute(`alter table "seen_mark" add constraint "seen_mark_user_id_tender_id_kind_unique" unique ("user_id", "tender_id", "kind");`);
    await this.execute(`alter table "seen_mark" add constraint "seen_mark_user_id_foreign" foreign key ("user_id") references "app_user" ("id") on update cascade on delete cascade;`);
    await this.execute(`alter table "seen_mark" add constraint "seen_mark_tender_id_foreign" foreign key ("tender_id") references "tender" ("id") on update cascade on delete cascade;`);
  }

  override async down(): Promise<void> {
    await this.execute(`drop table if exists "seen_mark" cascade;`);
  }
}
