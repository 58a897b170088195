import { Migration } from '@mikro-orm/migrations';

/**
 * The buyer's tender list comes a page at a time, newest closing first (issue 19): this index gives
 * a buyer's tenders in that order, so a page is read without sorting all of them
 * (server/services/queries/tenders.queries.ts).
 */
export class Migration20261205030000 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`create index "tender_created_by_id_closes_at_id_index" on "tender" ("created_by_id", "closes_at" desc, "id");`);
  }

  override async down(): Promise<void> {
    this.addSql(`drop index if exists "tender_created_by_id_closes_at_id_index";`);
  }

}
