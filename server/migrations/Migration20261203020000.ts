import { Migration } from '@mikro-orm/migrations';

/**
 * Opening, compliance check, abnormally low prices, bid validity (issue 13, points 5 to 8):
 * - `opening_record`: one per tender, written by the transaction that closes it (its JSON and the
 *   SHA-256 of its canonical JSON, which the `tender.closed` audit entry carries). Tenders closed
 *   before this migration have none.
 * - on `bid`: the buyer's compliance decision (ground and note), the abnormally-low decision
 *   (explanation asked, accepted, note) and the vendor's confirmed validity extension.
 * - a third kind of notice, the exclusion notice.
 */
export class Migration20261203020000 extends Migration {

  override async up(): Promise<void> {
    await this.execute(`create table "opening_record" (
      "id" uuid not null, "created_at" timestamptz not null default now(), "updated_at" timestamptz not null default now(),
      "tender_id" uuid not null, "content" jsonb not null, "digest" varchar(64) not null,
      constraint "opening_record_pkey" primary key ("id"));`);
    await this.execute(`alter table "opening_record" add constraint "opening_record_tender_id_unique" unique ("tender_id");`);
    await this.execute(`alter table "opening_record" add constraint "opening_record_tender_id_foreign" foreign key ("tender_id") references "tender" ("id") on update cascade on delete cascade;`);
    await this.execute(`alter table "bid"
      add column "compliance_decision" varchar(20) null,
      add column "compliance_ground" varchar(30) null,
      add column "compliance_note" text null,
      add column "compliance_decided_at" timestamptz null,
      add column "low_price_explanation_requested_at" timestamptz null,
      add column "low_price_accepted" boolean null,
      add column "low_price_note" text null,
      add column "low_price_decided_at" timestamptz null,
      add column "validity_extended_until" timestamptz null;`);
    // Written by hand: the decision and its ground go together (an exclusion always has a ground).
    await this.execute(`alter table "bid" add constraint "bid_compliance_check" check (
      (compliance_decision is null and compliance_ground is null)
      or (compliance_decision = 'compliant' and compliance_ground is null)
      or (compliance_decision = 'excluded' and compliance_ground in ('late-or-incomplete', 'qualification', 'conflict-of-interest', 'abnormally-low', 'other')));`);
    // Runs in the migration's transaction (PostgreSQL 12+); the value is first used by later ones.
    await this.execute(`alter type "notice_kind" add value if not exists 'exclusion';`);
  }

  override async down(): Promise<void> {
    await this.execute(`drop table if exists "opening_record" cascade;`);
    await this.execute(`alter table "bid" drop constraint "bid_compliance_check",
      drop column "compliance_decision", drop column "compliance_ground", drop column "compliance_note", drop column "compliance_decided_at",
      drop column "low_price_explanation_requested_at", drop column "low_price_accepted", drop column "low_price_note", drop column "low_price_decided_at",
      drop column "validity_extended_until";`);
    // An enum value cannot be dropped: 'exclusion' stays in notice_kind.
  }
}
