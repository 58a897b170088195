import { Client } from 'pg';
import { hashPassword } from '../../auth/password';
import { commitBid } from '../../services/bid-commitment';
import { DEFAULT_AWARD_BASIS } from '@shared/tenders';
import { randomSource } from '../../award/kernel';

/**
 * Fictional data for the benchmarks, written with plain SQL (thousands of rows in a second or two,
 * where going through the API would take minutes of sign-ins and saves).
 */
export const BENCH_PASSWORD = 'bench-password-not-secret';

export interface SeededTender {
  id: string;
  reference: string;
  regionCodes: string[];
}

export interface Seeded {
  buyerEmail: string;
  buyerId: string;
  vendors: { email: string; orgId: string }[];
  /** Closed, 30 submitted bids × 200 regions: the tabulation and the solve queue. */
  big: SeededTender;
  /** Open for a day, 40 regions, the first 50 vendors invited: saving bids. */
  open: SeededTender;
  /** Open, every vendor invited: the deadline rush (its closing time is set by the rush). */
  rush: SeededTender;
  /** Open, 40 regions each, one per vendor of the first 50 (vendor k alone invited to tender k). */
  own: SeededTender[];
  /** How many tenders the buyer's list holds in all (the lots above plus the bulk of small ones). */
  buyerTenders: number;
}

export interface SeedOptions {
  vendors?: number;
  /** Regions of the rush tender. */
  rushRegions?: number;
  /** Small tenders of the buyer (drafts, open and closed), beside the ones above. */
  buyerBulk?: number;
}

/** The engine's seeded generator (mulberry32), so two runs price the same bids. */
export const prng = randomSource;

/** The award basis of a tender whose buyer sets no rule (a constant, so written into the SQL). */
const AWARD_BASIS = `'${JSON.stringify(DEFAULT_AWARD_BASIS)}'::jsonb`;

const pad = (n: number, w = 3) => String(n).padStart(w, '0');

async function createTender(
  db: Client, buyerId: string, o: { reference: string; title: string; status: 'open' | 'closed'; closesInMinutes: number; regions: number; invite: string[] },
): Promise<SeededTender> {
  const { rows } = await db.query<{ id: string }>(
    `insert into tender (id, reference, title, commodity, unit, currency, closes_at, status, created_by_id, published_at, closed_at, award_basis)
     values (gen_random_uuid(), $1, $2, 'Road salt', 't', 'EUR', now() + make_interval(mins => $3::int), $4::tender_status, $5, now() - interval '10 days',
             case when $4::text = 'closed' then now() + make_interval(mins => $3::int) end, ${AWARD_BASIS})
     returning id`,
    [o.reference, o.title, o.closesInMinutes, o.status, buyerId],
  );
  const id = rows[0].id;
  await db.query(
    `insert into region (id, tender_id, code, name, forecast, position)
     select gen_random_uuid(), $1, 'R' || lpad(i::text, 3, '0'), 'Depot ' || i, 400 + (i * 137) % 900, i - 1
       from generate_series(1, $2) i`,
    [id, o.regions],
  );
  await db.query(
    `insert into invitation (id, tender_id, vendor_organisation_id, invited_by_id, notified_at)
     select gen_random_uuid(), $1, org, $2, now() from unnest($3::uuid[]) org`,
    [id, buyerId, o.invite],
  );
  return { id, reference: o.reference, regionCodes: Array.from({ length: o.regions }, (_, i) => `R${pad(i + 1)}`) };
}

/** Submitted bids of the given vendors on a tender, every region priced. */
async function submitBids(db: Client, tender: SeededTender, orgIds: string[], random: () => number): Promise<void> {
  const { rows: regions } = await db.query<{ id: string; code: string; forecast: string }>(
    `select id, code, forecast from region where tender_id = $1 order by position`, [tender.id],
  );
  const totalForecast = regions.reduce((s, r) => s + Number(r.forecast), 0);
  const base = regions.map(() => 50 + random() * 40);
  for (const orgId of orgIds) {
    const factor = 0.9 + random() * 0.3;
    const prices: Record<string, number> = {};
    regions.forEach((r, k) => (prices[r.code] = Math.round(base[k] * factor * (0.95 + random() * 0.1) * 100) / 100));
    const fixedFee = Math.round(10_000 + random() * 50_000);
    // A third of the vendors cannot supply more than a quarter of the whole forecast.
    const capacity = random() < 0.33 ? Math.round(totalForecast * 0.25) : null;
    const { nonce, digest } = commitBid({ tender: tender.reference, vendor: orgId, revision: 1, fixedFee, capacity, prices });
    const { rows } = await db.query<{ id: string }>(
      `insert into bid (id, tender_id, vendor_organisation_id, status, fixed_fee, capacity, submitted_at, digest, nonce, revision, version)
       values (gen_random_uuid(), $1, $2, 'submitted', $3, $4, now() - interval '1 day', $5, $6, 1, 2) returning id`,
      [tender.id, orgId, fixedFee, capacity, digest, nonce],
    );
    await db.query(
      `insert into bid_line (id, bid_id, region_id, unit_price) select gen_random_uuid(), $1, r, p from unnest($2::uuid[], $3::numeric[]) as x(r, p)`,
      [rows[0].id, regions.map((r) => r.id), regions.map((r) => prices[r.code])],
    );
  }
}

export async function seedBenchData(databaseUrl: string, options: SeedOptions = {}): Promise<Seeded> {
  const { vendors: vendorCount = 200, rushRegions = 20, buyerBulk = 0 } = options;
  const db = new Client({ connectionString: databaseUrl });
  await db.connect();
  try {
    const hash = await hashPassword(BENCH_PASSWORD);
    const buyerEmail = 'buyer@county-roads.test';
    const buyer = await db.query<{ id: string }>(
      `insert into app_user (id, email, name, role, password_hash) values (gen_random_uuid(), $1, 'Mara Quell', 'buyer', $2) returning id`,
      [buyerEmail, hash],
    );
    const buyerId = buyer.rows[0].id;
    const orgs = await db.query<{ id: string; n: number }>(
      `insert into vendor_organisation (id, name, registration_number, sme, contact_email)
       select gen_random_uuid(), 'Saltway Supply ' || lpad(i::text, 3, '0'), 'BR-' || lpad(i::text, 3, '0'), i % 4 = 0,
              'office' || lpad(i::text, 3, '0') || '@saltway.test'
         from generate_series(1, $1) i
       returning id, substring(registration_number from 4)::int as n`,
      [vendorCount],
    );
    const byN = orgs.rows.sort((a, b) => a.n - b.n);
    await db.query(
      `insert into app_user (id, email, name, role, vendor_organisation_id, password_hash)
       select gen_random_uuid(), 'bidder' || substring(o.registration_number from 4) || '@saltway.test',
              'Bidder ' || substring(o.registration_number from 4), 'vendor', o.id, $1
         from vendor_organisation o`,
      [hash],
    );
    const vendors = byN.map((o) => ({ orgId: o.id, email: `bidder${pad(o.n)}@saltway.test` }));
    const all = vendors.map((v) => v.orgId);
    const random = prng(7);

    // What a vendor's tender list holds: two dozen tenders of 20 regions, open and closed.
    for (let k = 1; k <= 24; k++) {
      const t = await createTender(db, buyerId, {
        reference: `BENCH-L${pad(k, 2)}`, title: `Winter salt, lot ${k}`, status: k % 3 === 0 ? 'closed' : 'open',
        closesInMinutes: k % 3 === 0 ? -60 * 24 * k : 60 * 24 * k, regions: 20, invite: all,
      });
      if (k % 4 === 1) await submitBids(db, t, all.slice(0, 5), random);
    }
    const big = await createTender(db, buyerId, {
      reference: 'BENCH-BIG', title: 'Road salt, whole network', status: 'closed', closesInMinutes: -60, regions: 200, invite: all.slice(0, 30),
    });
    await submitBids(db, big, all.slice(0, 30), random);
    const open = await createTender(db, buyerId, {
      reference: 'BENCH-OPEN', title: 'Grit for footpaths', status: 'open', closesInMinutes: 60 * 24, regions: 40, invite: all.slice(0, 50),
    });
    const rush = await createTender(db, buyerId, {
      reference: 'BENCH-RUSH', title: 'Brine for the bridges', status: 'open', closesInMinutes: 60, regions: rushRegions, invite: all,
    });
    const own: SeededTender[] = [];
    for (let k = 0; k < Math.min(50, all.length); k++) {
      own.push(await createTender(db, buyerId, {
        reference: `BENCH-OWN${pad(k + 1, 2)}`, title: `Grit for depot ${k + 1}`, status: 'open', closesInMinutes: 60 * 24, regions: 40, invite: [all[k]],
      }));
    }
    await seedBuyerBulk(db, buyerId, buyerBulk);
    // As autovacuum leaves a database at rest: statistics and the visibility map (index-only scans).
    await db.query('vacuum analyze');
    const { rows: counted } = await db.query<{ n: number }>(`select count(*)::int as n from tender where created_by_id = $1`, [buyerId]);
    return { buyerEmail, buyerId, vendors, big, open, rush, own, buyerTenders: counted[0].n };
  } finally {
    await db.end();
  }
}

/**
 * A buyer's back catalogue: `count` small tenders (10 regions each; a seventh drafts, a third closed,
 * the rest open), none with vendors invited, written in three statements.
 */
async function seedBuyerBulk(db: Client, buyerId: string, count: number): Promise<void> {
  if (!count) return;
  await db.query(
    `insert into tender (id, reference, title, commodity, unit, currency, closes_at, status, created_by_id, published_at, closed_at, award_basis)
     select gen_random_uuid(), 'BENCH-B' || lpad(i::text, 4, '0'), 'Salt for district ' || i, 'Road salt', 't', 'EUR',
            now() + make_interval(days => case when i % 3 = 0 then -(i % 300) - 1 else (i % 300) + 1 end), s.status::tender_status, $1,
            case when s.status = 'draft' then null else now() - interval '400 days' end,
            case when s.status = 'closed' then now() - make_interval(days => (i % 300) + 1) end, ${AWARD_BASIS}
       from generate_series(1, $2::int) i,
            lateral (select case when i % 3 = 0 then 'closed' when i % 7 = 0 then 'draft' else 'open' end as status) s`,
    [buyerId, count],
  );
  await db.query(
    `insert into region (id, tender_id, code, name, forecast, position)
     select gen_random_uuid(), t.id, 'R' || lpad(i::text, 3, '0'), 'Depot ' || i, 300 + (i * 53) % 700, i - 1
       from tender t, generate_series(1, 10) i where t.reference ~ '^BENCH-B[0-9]{4}$'`,
  );
}

/**
 * Closed 200-region tenders with identical submitted bids from the given vendors (each priced with
 * the same generator seed): the queue benchmark solves the same problems on a tender of its own in
 * each set-up, so one set-up's runs never show in the next one's run list.
 */
export async function seedClosedTwins(databaseUrl: string, buyerEmail: string, orgIds: string[], count: number): Promise<SeededTender[]> {
  const db = new Client({ connectionString: databaseUrl });
  await db.connect();
  try {
    const buyer = await db.query<{ id: string }>(`select id from app_user where email = $1`, [buyerEmail]);
    if (!buyer.rows[0]) throw new Error(`no buyer ${buyerEmail}: seed the benchmark data first`);
    const out: SeededTender[] = [];
    for (let k = 1; k <= count; k++) {
      const t = await createTender(db, buyer.rows[0].id, {
        reference: `BENCH-TWIN${k}`, title: `Road salt, whole network (copy ${k})`, status: 'closed', closesInMinutes: -60, regions: 200, invite: orgIds,
      });
      await submitBids(db, t, orgIds, prng(11));
      out.push(t);
    }
    await db.query('analyze');
    return out;
  } finally {
    await db.end();
  }
}
