import { Migration } from '@mikro-orm/migrations';

/**
 * The procedure's fixed terms, stored on the tender and locked at publish: the published award
 * basis (engine rule names), the buying body, the procedure's time zone, the pre-tender estimate,
 * the bid validity period, the clarification deadline and the abnormally-low threshold.
 * Tenders stored before keep a plain split award basis and UTC.
 */
export class Migration20261203000000 extends Migration {

  override async up(): Promise<void> {
    await this.execute(`alter table "tender"
      add column "award_basis" jsonb not null default '{"sourcing":"split","soleRegions":[]}',
      add column "buying_body" jsonb null,
      add column "time_zone" varchar(64) not null default 'UTC',
      add column "estimated_value" numeric(16,2) null,
      add column "bid_validity_days" int not null default 90,
      add column "clarifications_close_at" timestamptz null,
      add column "abnormally_low_percent" numeric(5,2) not null default 20;`);
    await this.execute(`alter table "tender" alter column "award_basis" drop default;`);
  }

  override async down(): Promise<void> {
    await this.execute(`alter table "tender"
      drop column "award_basis", drop column "buying_body", drop column "time_zone", drop column "estimated_value",
      drop column "bid_validity_days", drop column "clarifications_close_at", drop column "abnormally_low_percent";`);
  }
}
