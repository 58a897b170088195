import { Migration } from '@mikro-orm/migrations';

/**
 * Notification e-mails (issue 18, point 2):
 * - `notification_sent`: one row per notification queued, unique by (kind, subject, recipient), so
 *   that no event is e-mailed twice to the same person;
 * - `notification_setting`: a person's choice of reminders (no row: all on).
 */
export class Migration20261205020000 extends Migration {

  override async up(): Promise<void> {
    await this.execute(`create table "notification_sent" (
      "id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(),
      "kind" text not null, "subject_id" uuid not null, "recipient_id" uuid not null, "tender_id" uuid null, "subject" text not null,
      constraint "notification_sent_pkey" primary key ("id"));`);
    await this.execute(`create index "notification_sent_tender_id_index" on "notification_sent" ("tender_id");`);
    await this.execute(`alter table "notification_sent" add constraint "notification_sent_once" unique ("kind", "subject_id", "recipient_id");`);
    await this.execute(`alter table "notification_sent" add constraint "notification_sent_recipient_id_foreign" foreign key ("recipient_id") references "app_user" ("id") on update cascade on delete cascade;`);
    await this.execute(`alter table "notification_sent" add constraint "notification_sent_tender_id_foreign" foreign key ("tender_id") references "tender" ("id") on update cascade on delete cascade;`);
    await this.execute(`create table "notification_setting" (
      "user_id" uuid not null, "closing_reminders" boolean not null default true, "decision_updates" boolean not null default true,
      "updated_at" timestamptz not null default now(),
      constraint "notification_setting_pkey" primary key ("user_id"));`);
    await this.execute(`alter table "notification_setting" add constraint "notification_setting_user_id_foreign" foreign key ("user_id") references "app_user" ("id") on update cascade on delete cascade;`);
  }

  override async down(): Promise<void> {
    await this.execute(`drop table if exists "notification_setting" cascade;`);
    await this.execute(`drop table if exists "notification_sent" cascade;`);
  }
}
