import { Migration } from '@mikro-orm/migrations';
import { normaliseEmail } from '../../shared/auth';

/**
 * Accounts (issue 12, points 3 and 5):
 * - e-mails stored in the one normalised form (`normaliseEmail`: NFKC, lower case, trimmed), computed
 *   here in JavaScript so that it is exactly the function every sign-in and invitation uses (the
 *   database's lower() follows its own locale); a unique index on the stored value replaces the one
 *   on lower(email), and lookups compare exactly;
 * - a vendor account's membership of its organisation (approved by the organisation's contact);
 * - a second kind of one-time link, the password reset.
 */
export class Migration20261202164500 extends Migration {

  override async up(): Promise<void> {
    const users = await this.execute(`select id, email from "app_user"`) as { id: string; email: string }[];
    const seen = new Map<string, string>();
    for (const u of users) {
      const email = normaliseEmail(u.email);
      const other = seen.get(email);
      if (other) throw new Error(`Accounts ${other} and ${u.id} have the same e-mail once normalised (${email}): merge or rename one, then migrate again.`);
      seen.set(email, u.id);
      if (email !== u.email) await this.execute(`update "app_user" set "email" = ? where "id" = ?`, [email, u.id]);
    }
    const orgs = await this.execute(`select id, contact_email from "vendor_organisation"`) as { id: string; contact_email: string }[];
    for (const o of orgs) {
      const email = normaliseEmail(o.contact_email);
      if (email !== o.contact_email) await this.execute(`update "vendor_organisation" set "contact_email" = ? where "id" = ?`, [email, o.id]);
    }
    await this.execute(`drop index if exists "app_user_email_lower_unique"`);
    await this.execute(`alter table "app_user" add constraint "app_user_email_unique" unique ("email")`);

    await this.execute(`create type "membership_state" as enum ('approved', 'pending', 'refused')`);
    await this.execute(`alter table "app_user" add column "membership" "membership_state" not null default 'approved'`);

    await this.execute(`alter type "account_token_purpose" add value if not exists 'reset'`);
  }

  override async down(): Promise<void> {
    await this.execute(`alter table "app_user" drop column "membership"`);
    await this.execute(`drop type "membership_state"`);
    await this.execute(`alter table "app_user" drop constraint "app_user_email_unique"`);
    await this.execute(`create unique index "app_user_email_lower_unique" on "app_user" (lower("email"))`);
    // An enum value cannot be dropped; 'reset' stays in account_token_purpose.
  }

}
