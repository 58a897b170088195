import { describeChanges, type AmendmentChanges } from '@shared/procedure';
import type { BuyingBody } from '@shared/tenders';
import { wallTimeToUtc } from '@shared/time-zone';

/**
 * A tender as an Open Contracting Data Standard 1.1.5 release package: one release per stage the
 * procedure reached, each the whole picture as known at its date. A pure function of plain input, so
 * that the stages can be tested without a database and the loading (ocds.service.ts) stays apart.
 * The table "Open data (OCDS)" in DEVELOPERS.md lists which field goes where.
 *
 * What is never published: the buyer's estimated value (internal, `tender.value` is left out), who
 * asked a clarification, bid figures of unsuccessful bidders, and — before the tender closed —
 * anything about the bids at all (not even how many).
 */

/** A contract recorded after the standstill (the contract step): one per awarded vendor. */
export interface ContractInput {
  vendorId: string;
  /** The signature date, `YYYY-MM-DD` in the tender's time zone (or an instant). */
  signedOn: string | Date;
  lines: { regionCode: string; quantity: number; unitPrice: number }[];
}

export interface OcdsParty {
  vendorId: string;
  name: string;
  registrationNumber: string;
}

export interface OcdsInput {
  tender: {
    id: string;
    reference: string;
    title: string;
    description: string;
    commodity: string;
    unit: string;
    /** ISO 4217. */
    currency: string;
    timeZone: string;
    buyingBody: BuyingBody | null;
    /** The published award basis in words (describeAwardBasis). */
    awardBasis: string[];
    publishedAt: Date | null;
    /** As now (after every amendment). */
    closesAt: Date;
    /** Set by hand, or null: 5 days before the closing time in force. */
    clarificationsCloseAt: Date | null;
    closedAt: Date | null;
    cancelledAt: Date | null;
    cancellationReason: string | null;
    /** As now (after every amendment), in the buyer's order. */
    regions: { code: string; name: string; forecast: number }[];
  };
  amendments: { number: number; issuedAt: Date; reason: string; changes: AmendmentChanges }[];
  /** When each clarification was answered (published to the invited vendors). */
  answeredAt: Date[];
  /** Every bidder whose bid was opened; null while the bids are sealed. */
  tenderers: OcdsParty[] | null;
  /** The approved award; null until compliance approved a recommendation. */
  award: {
    approvedAt: Date;
    vendors: (OcdsParty & { fixedFee: number; lines: { regionCode: string; quantity: number; unitPrice: number }[] })[];
  } | null;
  /** When every bidder's notice had been sent, and the standstill end they state. */
  notified: { at: Date; standstillEndsAt: Date | null } | null;
  contracts: ContractInput[];
}

export interface OcdsOptions {
  /** The registered ocid prefix, e.g. `ocds-abc123`. */
  ocidPrefix: string;
  /** Where this package is served. */
  uri: string;
}

type Json = Record<string, unknown>;

/** Where a stage of the procedure leaves the releases' story. */
interface Stage {
  key: string;
  tag: string;
  date: Date;
}

const BUYER_PARTY = 'buying-body';
const day = 86_400_000;

/** Amount in the tender's currency; float dust removed (figures have at most 4 decimals, quantities 6). */
function money(amount: number, currency: string): Json {
  return { amount: Math.round(amount * 1e4) / 1e4, currency };
}

/** The regions, closing time and description as they stood after `upTo` amendments (0 = as published). */
function asAmended(input: OcdsInput, upTo: number): { regions: OcdsInput['tender']['regions']; closesAt: Date; description: string } {
  let regions = input.tender.regions.map((r) => ({ ...r }));
  let closesAt = input.tender.closesAt;
  let description = input.tender.description;
  const later = input.amendments.filter((a) => a.number > upTo).sort((a, b) => b.number - a.number);
  for (const a of later) {
    const c = a.changes;
    if (c.closesAt) closesAt = new Date(c.closesAt.from);
    if (c.description) description = c.description.from;
    const added = new Set((c.regionsAdded ?? []).map((r) => r.code));
    regions = regions.filter((r) => !added.has(r.code));
    for (const r of c.regionsChanged ?? []) {
      const region = regions.find((x) => x.code === r.code);
      if (region) Object.assign(region, { name: r.fromName, forecast: r.fromForecast });
    }
    regions.push(...(c.regionsRemoved ?? []).map((r) => ({ code: r.code, name: r.name, forecast: r.forecast })));
  }
  return { regions, closesAt, description };
}

function countryName(code: string): string {
  return new Intl.DisplayNames(['en'], { type: 'region' }).of(code) ?? code;
}

function vendorParty(p: OcdsParty, roles: string[]): Json {
  // The registration number without a scheme: the register it comes from is not recorded.
  return { id: p.vendorId, name: p.name, identifier: { id: p.registrationNumber, legalName: p.name }, roles };
}

function dateSigned(signedOn: string | Date, timeZone: string): string {
  if (signedOn instanceof Date) return signedOn.toISOString();
  return /^\d{4}-\d{2}-\d{2}$/.test(signedOn) ? wallTimeToUtc(`${signedOn}T00:00`, timeZone) : new Date(signedOn).toISOString();
}

/** Contracts in the order they were signed. */
function signedInOrder(contracts: ContractInput[], timeZone: string): ContractInput[] {
  return [...contracts].sort((a, b) => dateSigned(a.signedOn, timeZone).localeCompare(dateSigned(b.signedOn, timeZone)));
}

/** The stages reached, in order, each becoming one release. */
function stagesOf(input: OcdsInput): Stage[] {
  const t = input.tender;
  if (t.cancelledAt && !t.publishedAt) return [{ key: 'cancellation', tag: 'tenderCancellation', date: t.cancelledAt }];
  if (!t.publishedAt) return [];
  const stages: Stage[] = [{ key: 'tender', tag: 'tender', date: t.publishedAt }];
  for (const a of [...input.amendments].sort((x, y) => x.number - y.number)) stages.push({ key: `amendment-${a.number}`, tag: 'tenderAmendment', date: a.issuedAt });
  if (t.cancelledAt) return [...stages, { key: 'cancellation', tag: 'tenderCancellation', date: t.cancelledAt }];
  if (t.closedAt && input.tenderers) stages.push({ key: 'opening', tag: 'tenderUpdate', date: t.closedAt });
  if (input.award && input.tenderers) {
    stages.push({ key: 'award', tag: 'award', date: input.award.approvedAt });
    if (input.notified) stages.push({ key: 'notices', tag: 'awardUpdate', date: input.notified.at });
    for (const c of signedInOrder(input.contracts, t.timeZone)) stages.push({ key: `contract-${c.vendorId}`, tag: 'contract', date: new Date(dateSigned(c.signedOn, t.timeZone)) });
  }
  return stages;
}

/** The release package of the procedure; throws when nothing has been published (a draft). */
export function buildReleasePackage(input: OcdsInput, options: OcdsOptions): Json {
  const t = input.tender;
  const ocid = `${options.ocidPrefix}-${t.id}`;
  const stages = stagesOf(input);
  if (!stages.length) throw new RangeError('A draft has no release: publish the tender first.');
  const releaseId = (s: Stage) => `${ocid}-${s.key}`;
  const regionName = new Map<string, string>();
  for (let n = 0; n <= input.amendments.length; n++) for (const r of asAmended(input, n).regions) regionName.set(r.code, r.name);
  for (const a of input.award?.vendors ?? []) if (a.lines.some((l) => !regionName.has(l.regionCode))) throw new RangeError(`Award of ${a.vendorId} names an unknown region.`);

  const releases = stages.map((stage) => {
    const at = stage.date.getTime();
    const amendmentsSoFar = [...input.amendments].filter((a) => a.issuedAt.getTime() <= at && stage.tag !== 'tender').sort((a, b) => a.number - b.number);
    const facts = asAmended(input, amendmentsSoFar.at(-1)?.number ?? 0);
    const afterOpening = ['tenderUpdate', 'award', 'awardUpdate', 'contract'].includes(stage.tag);
    const awarded = ['award', 'awardUpdate', 'contract'].includes(stage.tag) ? input.award : null;
    const contractsSoFar = signedInOrder(input.contracts, t.timeZone).filter((c) => new Date(dateSigned(c.signedOn, t.timeZone)).getTime() <= at && stage.tag === 'contract');

    const parties: Json[] = [];
    if (t.buyingBody) {
      const b = t.buyingBody;
      parties.push({
        id: BUYER_PARTY, name: b.name,
        address: { ...(b.address ? { streetAddress: b.address } : {}), countryName: countryName(b.country) },
        contactPoint: { email: b.email },
        roles: ['buyer', 'procuringEntity'],
      });
    }
    const supplierIds = new Set((awarded?.vendors ?? []).map((v) => v.vendorId));
    if (afterOpening) for (const p of input.tenderers ?? []) parties.push(vendorParty(p, supplierIds.has(p.vendorId) ? ['tenderer', 'supplier'] : ['tenderer']));

    const buyerRef = t.buyingBody ? { id: BUYER_PARTY, name: t.buyingBody.name } : undefined;
    const clarificationsEnd = t.clarificationsCloseAt ?? new Date(facts.closesAt.getTime() - 5 * day);
    const tender: Json = {
      id: t.reference,
      title: t.title,
      ...(facts.description ? { description: facts.description } : {}),
      status: stage.tag === 'tenderCancellation' ? 'cancelled' : awarded ? 'complete' : 'active',
      ...(buyerRef ? { procuringEntity: buyerRef } : {}),
      items: facts.regions.map((r) => ({ id: r.code, description: `${t.commodity}, ${r.name}`, quantity: r.forecast, unit: { name: t.unit } })),
      procurementMethod: 'selective',
      procurementMethodDetails: 'Invited vendors only: the buyer invites the vendors that may bid.',
      mainProcurementCategory: 'goods',
      awardCriteria: 'priceOnly',
      awardCriteriaDetails: ['Lowest total cost: fixed fees plus unit prices at the forecast quantities, under the published award basis.', ...t.awardBasis].join(' '),
      submissionMethod: ['electronicSubmission'],
      tenderPeriod: { ...(t.publishedAt ? { startDate: t.publishedAt.toISOString() } : {}), endDate: facts.closesAt.toISOString() },
      enquiryPeriod: { ...(t.publishedAt ? { startDate: t.publishedAt.toISOString() } : {}), endDate: clarificationsEnd.toISOString() },
      hasEnquiries: input.answeredAt.some((d) => d.getTime() <= at),
    };
    if (afterOpening && t.closedAt && input.tenderers) {
      tender.awardPeriod = { startDate: t.closedAt.toISOString(), ...(awarded ? { endDate: awarded.approvedAt.toISOString() } : {}) };
      tender.numberOfTenderers = input.tenderers.length;
      tender.tenderers = input.tenderers.map((p) => ({ id: p.vendorId, name: p.name }));
    }
    if (amendmentsSoFar.length) {
      tender.amendments = amendmentsSoFar.map((a) => {
        const own = stages.findIndex((s) => s.key === `amendment-${a.number}`);
        return {
          id: String(a.number), date: a.issuedAt.toISOString(), rationale: a.reason, description: describeChanges(a.changes, t.unit, t.timeZone).join(' '),
          amendsReleaseID: releaseId(stages[own - 1]), releaseID: releaseId(stages[own]),
        };
      });
    }
    if (stage.tag === 'tenderCancellation') {
      tender.documents = [{ id: 'cancellation', documentType: 'cancellationDetails', title: 'Reason for cancellation', description: t.cancellationReason ?? '', datePublished: stage.date.toISOString() }];
    }

    const release: Json = {
      ocid, id: releaseId(stage), date: stage.date.toISOString(), tag: [stage.tag], initiationType: 'tender', language: 'en',
      parties, ...(buyerRef ? { buyer: buyerRef } : {}), tender,
    };
    if (awarded) {
      const notified = ['awardUpdate', 'contract'].includes(stage.tag) ? input.notified : null;
      release.awards = awarded.vendors.map((v) => {
        const contracted = contractsSoFar.some((c) => c.vendorId === v.vendorId);
        const variable = v.lines.reduce((s, l) => s + l.quantity * l.unitPrice, 0);
        const standstill = notified?.standstillEndsAt ? ` The standstill period ends on ${notified.standstillEndsAt.toISOString()}.` : '';
        return {
          id: `award-${v.vendorId}`,
          title: `${t.title}: ${v.name}`,
          description: 'Value estimated at the forecast quantities (fixed fee plus unit prices times quantities); the forecasts are not a volume commitment.'
            + (notified ? ` Every bidder was notified on ${notified.at.toISOString()}.${standstill}` : ''),
          status: contracted ? 'active' : 'pending',
          date: awarded.approvedAt.toISOString(),
          value: money(v.fixedFee + variable, t.currency),
          suppliers: [{ id: v.vendorId, name: v.name }],
          items: v.lines.map((l) => ({
            id: l.regionCode, description: `${t.commodity}, ${regionName.get(l.regionCode)}`, quantity: l.quantity,
            unit: { name: t.unit, value: money(l.unitPrice, t.currency) },
          })),
        };
      });
      if (contractsSoFar.length) {
        release.contracts = contractsSoFar.map((c) => {
          const v = awarded.vendors.find((x) => x.vendorId === c.vendorId);
          if (!v) throw new RangeError(`Contract with ${c.vendorId}, who was not awarded.`);
          return {
            id: `contract-${c.vendorId}`, awardID: `award-${c.vendorId}`, title: `${t.title}: ${v.name}`, status: 'active',
            dateSigned: dateSigned(c.signedOn, t.timeZone),
            value: money(c.lines.reduce((s, l) => s + l.quantity * l.unitPrice, 0), t.currency),
            items: c.lines.map((l) => ({
              id: l.regionCode, description: `${t.commodity}, ${regionName.get(l.regionCode) ?? l.regionCode}`, quantity: l.quantity,
              unit: { name: t.unit, value: money(l.unitPrice, t.currency) },
            })),
          };
        });
      }
    }
    return release;
  });

  const last = stages[stages.length - 1];
  return {
    uri: options.uri,
    version: '1.1',
    // The date of the latest release, so that the same procedure always gives the same package.
    publishedDate: last.date.toISOString(),
    publisher: { name: t.buyingBody?.name ?? 'Tendara' },
    releases,
  };
}
