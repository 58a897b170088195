import { Migration } from '@mikro-orm/migrations';
import { commitBid } from '../services/bid-commitment';

/**
 * Bid receipts become commitments keyed with a random nonce per submission (sealed bids: the old
 * digest was an unsalted SHA-256 of the figures, which a reader of the audit trail or the outbox
 * could find by trying figures). Every live bid already stored gets a nonce and its commitment,
 * computed here from its stored figures; drafts and withdrawn bids have neither.
 */
export class Migration20261202175000 extends Migration {

  override async up(): Promise<void> {
    await this.execute(`alter table "bid" add column "nonce" varchar(64) null;`);
    const bids = await this.execute(
      `select b.id, t.reference, b.vendor_organisation_id, b.revision, b.fixed_fee, b.capacity,
              (select json_object_agg(r.code, l.unit_price) from bid_line l join region r on r.id = l.region_id where l.bid_id = b.id) as prices
         from bid b join tender t on t.id = b.tender_id
        where b.status in ('submitted', 'revised')`,
    ) as unknown as { id: string; reference: string; vendor_organisation_id: string; revision: number; fixed_fee: string; capacity: string | null; prices: Record<string, string | number> | null }[];
    for (const b of bids) {
      const prices = Object.fromEntries(Object.entries(b.prices ?? {}).map(([code, p]) => [code, Number(p)]));
      const { nonce, digest } = commitBid({
        tender: b.reference, vendor: b.vendor_organisation_id, revision: b.revision,
        fixedFee: Number(b.fixed_fee), capacity: b.capacity === null ? null : Number(b.capacity), prices,
      });
      await this.execute(`update "bid" set "nonce" = ?, "digest" = ? where "id" = ?`, [nonce, digest, b.id]);
    }
    await this.execute(`update "bid" set "digest" = null where "status" not in ('submitted', 'revised');`);
  }

  override async down(): Promise<void> {
    this.addSql(`alter table "bid" drop column "nonce";`);
  }

}
