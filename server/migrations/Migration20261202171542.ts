import { Migration } from '@mikro-orm/migrations';

/** The figures read from an uploaded bid workbook, so a bid saved with it can be checked against them. */
export class Migration20261202171542 extends Migration {

  override async up(): Promise<void> {
    this.addSql(`alter table "bid_document" add column "figures" jsonb null;`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "bid_document" drop column "figures";`);
  }

}
