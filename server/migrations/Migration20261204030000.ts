import { Migration } from '@mikro-orm/migrations';

/**
 * Standstill fixed at approval, the contract step (issue 15, points 1 and 4):
 * - on `tender`: the exemption ground of a zero-day standstill, the buying body's closure days and
 *   the standstill end written by the approval's transaction;
 * - a final tender status, `contracted`;
 * - `contract` (one per awarded vendor) and its schedule, `contract_line`.
 */
export class Migration20261204030000 extends Migration {

  override async up(): Promise<void> {
    await this.execute(`alter table "tender"
      add column "standstill_exemption" text null,
      add column "closure_days" jsonb not null default '[]',
      add column "standstill_ends_at" timestamptz null;`);
    // Runs in the migration's transaction (PostgreSQL 12+); the value is first used by later ones.
    await this.execute(`alter type "tender_status" add value if not exists 'contracted' after 'notified';`);
    await this.execute(`create table "contract" (
      "id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(),
      "tender_id" uuid not null, "vendor_organisation_id" uuid not null, "signed_on" date not null, "recorded_by_id" uuid not null,
      constraint "contract_pkey" primary key ("id"));`);
    await this.execute(`alter table "contract" add constraint "contract_tender_id_vendor_organisation_id_unique" unique ("tender_id", "vendor_organisation_id");`);
    await this.execute(`alter table "contract" add constraint "contract_tender_id_foreign" foreign key ("tender_id") references "tender" ("id") on update cascade on delete cascade;`);
    await this.execute(`alter table "contract" add constraint "contract_vendor_organisation_id_foreign" foreign key ("vendor_organisation_id") references "vendor_organisation" ("id") on update cascade;`);
    await this.execute(`alter table "contract" add constraint "contract_recorded_by_id_foreign" foreign key ("recorded_by_id") references "app_user" ("id") on update cascade;`);
    await this.execute(`create table "contract_line" (
      "id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(),
      "contract_id" uuid not null, "region_id" uuid not null, "quantity" numeric(16,4) not null, "unit_price" numeric(16,4) not null, "position" int not null,
      constraint "contract_line_pkey" primary key ("id"));`);
    await this.execute(`alter table "contract_line" add constraint "contract_line_contract_id_region_id_unique" unique ("contract_id", "region_id");`);
    await this.execute(`alter table "contract_line" add constraint "contract_line_contract_id_foreign" foreign key ("contract_id") references "contract" ("id") on update cascade on delete cascade;`);
    await this.execute(`alter table "contract_line" add constraint "contract_line_region_id_foreign" foreign key ("region_id") references "region" ("id") on update cascade;`);
  }

  override async down(): Promise<void> {
    await this.execute(`drop table if exists "contract_line" cascade;`);
    await this.execute(`drop table if exists "contract" cascade;`);
    await this.execute(`alter table "tender" drop column "standstill_exemption", drop column "closure_days", drop column "standstill_ends_at";`);
    // A value of an enum type cannot be dropped; `contracted` stays (unused) in tender_status.
  }
}
