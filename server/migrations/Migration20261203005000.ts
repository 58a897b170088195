import { Migration } from '@mikro-orm/migrations';

/**
 * A closed tender's first scenario is its published award basis: built-in kind `published`, placed
 * before `split` and `sole` so that lists ordered by kind show it first. (ADD VALUE may run inside
 * the migration's transaction on PostgreSQL 12 and later, as long as nothing in the same
 * transaction uses the new value.) The scenario rows themselves are made when a tender is first
 * evaluated (`ensureBuiltInScenarios`), for tenders closed before this migration too.
 */
export class Migration20261203005000 extends Migration {

  override async up(): Promise<void> {
    await this.execute(`alter type "built_in_scenario" add value if not exists 'published' before 'split';`);
  }

  override async down(): Promise<void> {
    // An enum value cannot be dropped: the type is rebuilt without it, and the scenarios of that
    // kind become the buyer's own (their runs and recommendations stay).
    await this.execute(`update "scenario" set "built_in" = null where "built_in" = 'published';`);
    await this.execute(`alter type "built_in_scenario" rename to "built_in_scenario_old";`);
    await this.execute(`create type "built_in_scenario" as enum ('split', 'sole');`);
    await this.execute(`alter table "scenario" alter column "built_in" type "built_in_scenario" using "built_in"::text::"built_in_scenario";`);
    await this.execute(`drop type "built_in_scenario_old";`);
  }
}
