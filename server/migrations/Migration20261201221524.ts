import { Migration } from '@mikro-orm/migrations';

/** People, vendor organisations, one-time account links, sessions and the mail catcher's store. */
export class Migration20261201221524 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create type "user_role" as enum ('admin', 'buyer', 'compliance', 'vendor');`);
    this.addSql(`create type "account_token_purpose" as enum ('invitation');`);
    this.addSql(`create table "mail_message" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "message_id" varchar(998) null, "from_address" varchar(998) not null, "to_addresses" text[] not null, "subject" varchar(998) not null, "text" text not null, "html" text null, "sent_at" timestamptz not null, "raw" bytea not null, constraint "mail_message_pkey" primary key ("id"));`);
    this.addSql(`create index "mail_message_sent_at_index" on "mail_message" ("sent_at");`);

    this.addSql(`create table "vendor_organisation" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "name" varchar(160) not null, "registration_number" varchar(40) not null, "sme" boolean not null default false, "contact_email" varchar(254) not null, constraint "vendor_organisation_pkey" primary key ("id"));`);
    this.addSql(`alter table "vendor_organisation" add constraint "vendor_organisation_registration_number_unique" unique ("registration_number");`);

    this.addSql(`create table "app_user" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "email" varchar(254) not null, "name" varchar(120) not null, "role" "user_role" not null, "vendor_organisation_id" uuid null, "password_hash" varchar(255) null, "active" boolean not null default true, "last_sign_in_at" timestamptz null, constraint "app_user_pkey" primary key ("id"));`);

    this.addSql(`create table "account_token" ("id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(), "user_id" uuid not null, "token_hash" varchar(64) not null, "purpose" "account_token_purpose" not null default 'invitation', "expires_at" timestamptz not null, "used_at" timestamptz null, constraint "account_token_pkey" primary key ("id"));`);

    this.addSql(`alter table "app_user" add constraint "app_user_vendor_organisation_id_foreign" foreign key ("vendor_organisation_id") references "vendor_organisation" ("id") on update cascade on delete restrict;`);

    this.addSql(`alter table "account_token" add constraint "account_token_user_id_foreign" foreign key ("user_id") references "app_user" ("id") on update cascade on delete cascade;`);
    // Written by hand beside the generated statements:
    // e-mail is unique regardless of case;
    this.addSql(`create unique index "app_user_email_lower_unique" on "app_user" (lower("email"));`);
    // a vendor belongs to an organisation and nobody else does;
    this.addSql(`alter table "app_user" add constraint "app_user_vendor_organisation_check" check ((role = 'vendor') = (vendor_organisation_id is not null));`);
    // the token hash is a SHA-256 in hex;
    this.addSql(`create unique index "account_token_token_hash_unique" on "account_token" ("token_hash");`);
    // sessions for express-session (connect-pg-simple's table, with the user id pulled out so
    // that deactivating a person ends their sessions at once);
    this.addSql(`create table "http_session" ("sid" varchar not null collate "default", "sess" json not null, "expire" timestamptz(6) not null, constraint "http_session_pkey" primary key ("sid"));`);
    this.addSql(`create index "http_session_expire_index" on "http_session" ("expire");`);
    this.addSql(`create index "http_session_user_index" on "http_session" (((sess #>> '{passport,user}')));`);
    // which demo or fixture data sets have been loaded, so that each loads once.
    this.addSql(`create table "seed_history" ("name" varchar(80) not null, "loaded_at" timestamptz not null default now(), constraint "seed_history_pkey" primary key ("name"));`);
  }

}
