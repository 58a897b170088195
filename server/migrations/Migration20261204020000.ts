import { Migration } from '@mikro-orm/migrations';

/**
 * Forecast sensitivity (issue 14, point 3): a child run of a run re-solves its stored problem with
 * every forecast (or one region's) changed by `forecast_change_percent` (e.g. -10); `scaled_region`
 * names the region when only one was changed.
 */
export class Migration20261204020000 extends Migration {

  override async up(): Promise<void> {
    await this.execute(`alter table "run" add column "forecast_change_percent" int null, add column "scaled_region" varchar(64) null;`);
  }

  override async down(): Promise<void> {
    await this.execute(`alter table "run" drop column "forecast_change_percent", drop column "scaled_region";`);
  }

}
