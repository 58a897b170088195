import type { EntityManager } from '@mikro-orm/postgresql';
import { Amendment, Bid, BidLine, Invitation, Question, Region, Tender, type User, type VendorOrganisation } from '../server/entities';
import { audit } from '../server/services/audit.service';
import { commitBid } from '../server/services/bid-commitment';
import { writeOpeningRecord } from '../server/services/opening';

/**
 * The demo's tenders — all invented: a highways partnership buying de-icing salt for twelve depots
 * (closed, with bids from all seven demo vendors, two answered clarifications and one amendment that
 * extended its closing), and a second, open tender for grit bins.
 */
const DEPOTS: [string, string, number][] = [
  ['ASH', 'Ashby Cross depot', 1500], ['BRH', 'Brindle Hill depot', 2400], ['CDG', 'Calder Gate depot', 3100],
  ['DUN', 'Dunmere depot', 4200], ['ELB', 'Elstow Bridge depot', 5600], ['FNH', 'Fernhollow depot', 9000],
  ['GRM', 'Garrow Moor depot', 2800], ['HTB', 'Hatherby depot', 3600], ['IVF', 'Ivelford depot', 6200],
  ['JSQ', "Jessop's Quay depot", 1900], ['KLT', 'Kilnsey Top depot', 4800], ['LRK', 'Larkmoor depot', 7300],
];

/**
 * Each demo vendor's offer: fixed fee, cap (null = none) and a price per depot (undefined = not bid).
 * Caps below the largest depots and cheap local firms make split and sole awards differ visibly.
 */
const SALT_BIDS: Record<string, { fee: number; cap: number | null; prices: (number | undefined)[] }> = {
  v1: { fee: 42000, cap: 20000, prices: [61.2, 60.8, 59.9, 59.5, 58.7, 58.9, 62.4, 61.0, 59.2, 63.1, 60.3, 59.8] },
  v2: { fee: 12000, cap: 9000, prices: [54.9, 55.4, 56.1, 57.3, undefined, 61.5, 55.8, undefined, undefined, 56.2, undefined, undefined] },
  v3: { fee: 8500, cap: 6000, prices: [undefined, undefined, 57.6, 56.4, 55.9, undefined, undefined, 56.8, 57.9, undefined, 58.2, undefined] },
  v4: { fee: 31000, cap: 16000, prices: [63.0, 62.1, 61.4, 60.2, 59.6, 59.1, 63.8, 60.7, 58.8, 64.5, 59.9, 58.4] },
  // Garrow Moor at 46.9: more than 20 % below that depot's median (60.5; threshold 48.4), flagged as
  // abnormally low; the buyer asked for an explanation and accepted it (see DEMO_LOW_PRICE below).
  v5: { fee: 6000, cap: 5000, prices: [undefined, undefined, undefined, undefined, undefined, undefined, 46.9, 54.6, undefined, 54.2, undefined, 57.1] },
  v6: { fee: 58000, cap: null, prices: [60.5, 60.5, 60.5, 60.5, 60.5, 60.5, 60.5, 60.5, 60.5, 60.5, 60.5, 60.5] },
  v7: { fee: 15000, cap: 8000, prices: [58.4, 57.9, undefined, 58.8, 57.2, 57.6, undefined, undefined, 56.9, undefined, 57.4, 56.6] },
};

const BIN_SITES: [string, string, number][] = [
  ['N01', 'North district', 420], ['N02', 'North-east district', 380], ['C01', 'Central district', 610],
  ['S01', 'South district', 350], ['W01', 'West district', 290],
];

const DAY = 86_400_000;

/** The demo's buying body (fictional, like everything here); procedures in Irish time. */
const NORTHVALE = {
  name: 'Northvale Highways Partnership',
  address: 'Unit 4, Harbour Road, Northvale',
  email: 'procurement@northvale.tendara.test',
  country: 'IE',
};
const TIME_ZONE = 'Europe/Dublin';

/** The buyer's recorded decision on the flagged Garrow Moor price (invented, as everything here). */
export const DEMO_LOW_PRICE = {
  vendor: 'v5',
  note: 'Explanation received: the firm stores salt at its own yard two kilometres from the Garrow Moor depot, so its haulage cost there is far lower; the price is sustainable and accepted.',
};

export function loadDemoTenders(
  em: EntityManager, buyer: User, orgs: Map<string, VendorOrganisation>, now = new Date(), vendorPeople = new Map<string, User>(),
): Tender {
  // 1. Closed: de-icing salt, twelve depots, seven bids.
  const salt = em.create(Tender, {
    reference: 'NHP-2026-014',
    title: 'Road de-icing salt for the 2026–27 winter, twelve depots',
    commodity: 'Rock salt, 6 mm grade, delivered',
    unit: 't',
    currency: 'EUR',
    closesAt: new Date(now.getTime() - 3 * DAY),
    standstillDays: 10,
    description:
      'The Northvale Highways Partnership (a fictional body) buys de-icing rock salt delivered to its twelve ' +
      'depots over one winter season. Forecast quantities are the expected tonnage per depot; a vendor may ' +
      'bid some depots only and state the most it can supply over the season.',
    status: 'closed',
    createdBy: buyer,
    // Published with the tender: split award, at most four vendors, none above 45 % of the total.
    awardBasis: { sourcing: 'split', soleRegions: [], maxVendors: 4, maxVendorShare: 0.45 },
    buyingBody: NORTHVALE,
    timeZone: TIME_ZONE,
    // The partnership's offices close between Christmas and New Year: no standstill ends then.
    closureDays: ['2026-12-29', '2026-12-30', '2026-12-31'],
    estimatedValue: 3_150_000,
    publishedAt: new Date(now.getTime() - 24 * DAY),
    closedAt: new Date(now.getTime() - 3 * DAY),
  });
  const regions = DEPOTS.map(([code, name, forecast], position) => em.create(Region, { tender: salt, code, name, forecast, position }));
  for (const [key, offer] of Object.entries(SALT_BIDS)) {
    const org = orgs.get(key)!;
    em.create(Invitation, { tender: salt, vendorOrganisation: org, invitedBy: buyer, notifiedAt: salt.publishedAt });
    const prices: Record<string, number> = {};
    offer.prices.forEach((p, i) => {
      if (p !== undefined) prices[regions[i].code] = p;
    });
    const bid = em.create(Bid, {
      tender: salt, vendorOrganisation: org, status: 'submitted', fixedFee: offer.fee, capacity: offer.cap,
      // Every bid came in after amendment 1 (below), so each answers it.
      answersAmendment: 1, revision: 1, submittedAt: new Date(now.getTime() - (5 + Number(key.slice(1))) * 3_600_000 - 3 * DAY),
      // Each bid's receipt commitment with its own nonce, as a submission makes them.
      ...commitBid({ tender: salt.reference, vendor: org.id, revision: 1, fixedFee: offer.fee, capacity: offer.cap, prices }),
    });
    for (const r of regions) if (prices[r.code] !== undefined) em.create(BidLine, { bid, region: r, unitPrice: prices[r.code] });
  }

  const saltTender = salt;
  // Two clarifications asked and answered before the deadline, and amendment 1, which gave vendors
  // two more days (the original closing time was five days ago).
  const clarifications: [string, number, string, string][] = [
    ['v3', 18, 'May a vendor deliver to a depot from more than one stockpile during the season?',
      'Yes. The unit price is per tonne delivered to the depot, wherever the salt comes from; each delivery must meet the 6 mm grade.'],
    ['v5', 15, 'Is the forecast for Fernhollow depot a firm quantity or an estimate?',
      'Every forecast is the expected tonnage for the season, not a commitment: call-offs follow the weather. Awards are made on the forecasts.'],
  ];
  clarifications.forEach(([key, daysAgo, text, answer], i) => {
    const asker = vendorPeople.get(key);
    if (!asker) return;
    const askedAt = new Date(now.getTime() - daysAgo * DAY);
    em.create(Question, {
      tender: salt, vendorOrganisation: orgs.get(key)!, askedBy: asker, text, status: 'answered', number: i + 1, answer,
      answeredAt: new Date(askedAt.getTime() + DAY), answeredBy: buyer, createdAt: askedAt, updatedAt: new Date(askedAt.getTime() + DAY),
    });
  });
  const amendedAt = new Date(now.getTime() - 8 * DAY);
  em.create(Amendment, {
    tender: salt, number: 1, issuedBy: buyer, createdAt: amendedAt, updatedAt: amendedAt,
    reason: 'Two depots were closed by flooding for a week; vendors asked for more time to confirm their supply routes.',
    changes: { closesAt: { from: new Date(now.getTime() - 5 * DAY).toISOString(), to: salt.closesAt.toISOString() } },
  });

  // 2. Open for two more weeks: grit bins, five districts, bids still coming in.
  const bins = em.create(Tender, {
    reference: 'NHP-2027-002',
    title: 'Grit bin refills, five districts',
    commodity: 'Salt and grit mix, bagged, delivered to bins',
    unit: 't',
    currency: 'EUR',
    closesAt: new Date(Math.ceil((now.getTime() + 14 * DAY) / 3_600_000) * 3_600_000),
    standstillDays: 10,
    description: 'Refilling of roadside grit bins across five districts of the fictional Northvale area.',
    status: 'open',
    createdBy: buyer,
    awardBasis: { sourcing: 'split', soleRegions: [], maxVendors: 3 },
    buyingBody: NORTHVALE,
    timeZone: TIME_ZONE,
    publishedAt: new Date(now.getTime() - 2 * DAY),
  });
  const sites = BIN_SITES.map(([code, name, forecast], position) => em.create(Region, { tender: bins, code, name, forecast, position }));
  for (const org of orgs.values()) em.create(Invitation, { tender: bins, vendorOrganisation: org, invitedBy: buyer, notifiedAt: bins.publishedAt });
  const early: [string, number, number | null, number[]][] = [['v2', 2500, 1500, [88, 91, 86.5, 92, 95]], ['v5', 1800, 900, [84, 87.5, 90, 89, 93]]];
  for (const [key, fee, cap, p] of early) {
    const org = orgs.get(key)!;
    const prices = Object.fromEntries(sites.map((s, i) => [s.code, p[i]]));
    const bid = em.create(Bid, {
      tender: bins, vendorOrganisation: org, status: 'submitted', fixedFee: fee, capacity: cap, revision: 1,
      submittedAt: new Date(now.getTime() - DAY), ...commitBid({ tender: bins.reference, vendor: org.id, revision: 1, fixedFee: fee, capacity: cap, prices }),
    });
    sites.forEach((s, i) => em.create(BidLine, { bid, region: s, unitPrice: p[i] }));
  }
  return saltTender;
}

/**
 * What happened at and after the salt tender's closing, written as the application writes it: the
 * opening record with its digest in the `tender.closed` entry, every bid found compliant by the
 * buyer, and the buyer's decision on the one abnormally low price (explanation asked a day after
 * closing, accepted) — each with its audit entry.
 */
export async function completeDemoOpening(em: EntityManager, salt: Tender, buyer: User, orgs: Map<string, VendorOrganisation>): Promise<void> {
  await em.flush();
  const closedAt = salt.closedAt!;
  const opening = await writeOpeningRecord(em, salt.id, closedAt);
  await audit(em, {
    tenderId: salt.id, actor: null, action: 'tender.closed', subject: 'tender',
    detail: { submittedBids: Object.keys(SALT_BIDS).length, ...opening }, before: { status: 'open' }, after: { status: 'closed' },
  });
  const checkedAt = new Date(closedAt.getTime() + 2 * 3_600_000);
  const note = 'Complete bid; qualification documents checked against the criteria.';
  await em.nativeUpdate(Bid, { tender: salt.id }, { complianceDecision: 'compliant', complianceGround: null, complianceNote: note, complianceDecidedAt: checkedAt });
  for (const key of Object.keys(SALT_BIDS)) {
    const org = orgs.get(key)!;
    await audit(em, {
      tenderId: salt.id, actor: buyer, action: 'bid.compliant', subject: `vendor ${org.name}`,
      detail: { vendor: org.name, decision: 'compliant', ground: null, note, decidedAt: checkedAt.toISOString() },
      after: { decision: 'compliant', ground: null, note },
    });
  }
  const flagged = orgs.get(DEMO_LOW_PRICE.vendor)!;
  const askedAt = new Date(closedAt.getTime() + DAY);
  const decidedAt = new Date(closedAt.getTime() + 2 * DAY);
  await em.nativeUpdate(Bid, { tender: salt.id, vendorOrganisation: flagged.id }, {
    lowPriceExplanationRequestedAt: askedAt, lowPriceAccepted: true, lowPriceNote: DEMO_LOW_PRICE.note, lowPriceDecidedAt: decidedAt,
  });
  const mine = opening.abnormallyLow.find((f) => f.vendor === flagged.id);
  await audit(em, {
    tenderId: salt.id, actor: buyer, action: 'bid.abnormally-low-accepted', subject: `vendor ${flagged.name}`,
    detail: { vendor: flagged.name, explanationRequestedAt: askedAt.toISOString(), accepted: true, note: DEMO_LOW_PRICE.note, flags: { regions: mine?.regions ?? [], total: mine?.total ?? false } },
    after: { explanationRequestedAt: askedAt.toISOString(), accepted: true, note: DEMO_LOW_PRICE.note },
  });
}
