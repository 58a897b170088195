import type { EntityManager } from '@mikro-orm/postgresql';
import type { AwardResult } from '@shared/award';
import type { ContractInput, ContractLineView, ContractsView } from '@shared/contracts';
import { statusesBefore } from '@shared/tenders';
import { Contract, ContractLine, Region, Tender, VendorOrganisation, type User } from '../entities';
import { ConflictError, ValidationError, type FieldError } from '../http/errors';
import { audit } from './audit.service';
import { approvedRecommendation, storedStandstillEnd } from './notices/letters';
import { addDays, localDate } from './standstill';
import { findVisibleTender, lockTender } from './tender-access';
import { transition } from './transition';

/** Contracts are recorded once the letters are out (notified) and until the last one is in. */
const RECORDING = ['notified'] as const;

/**
 * The first signature date allowed: the day after the standstill's last day in the procedure's
 * zone (it ends at 23:59 that day), or the approval's own day when no standstill applies.
 */
function earliestSignedOn(tender: Tender, endsAt: Date): string {
  return tender.standstillDays > 0 ? addDays(localDate(endsAt, tender.timeZone), 1) : localDate(endsAt, tender.timeZone);
}

function waitingReason(tender: Tender, endsAt: Date | null, now: Date): string | null {
  if (tender.status === 'contracted') return 'Every awarded vendor’s contract is recorded.';
  if (tender.status === 'awarded') return 'The award is pending: the notices are not all sent yet.';
  if (tender.status !== 'notified' || !endsAt) return 'Contracts are recorded after the award is approved and its notices sent.';
  if (now < endsAt) return 'The award is pending: the standstill period is running.';
  return null;
}

async function awardOf(em: EntityManager, tender: Tender) {
  const rec = await approvedRecommendation(em, tender);
  const result = rec.run.result as AwardResult;
  const regions = new Map((await em.find(Region, { tender }, { orderBy: { position: 'asc' } })).map((r) => [r.code, r]));
  return { rec, result, regions, endsAt: storedStandstillEnd(tender, rec.decidedAt!) };
}

export async function listContracts(em: EntityManager, user: User, tenderId: string, now = new Date()): Promise<ContractsView> {
  const tender = await findVisibleTender(em, user, tenderId);
  const base: ContractsView = {
    tenderId, status: tender.status, timeZone: tender.timeZone, standstillEndsAt: tender.standstillEndsAt?.toISOString() ?? null,
    earliestSignedOn: null, open: false, waiting: waitingReason(tender, null, now), vendors: [],
  };
  if (!['awarded', 'notified', 'contracted'].includes(tender.status)) return base;
  const { result, regions, endsAt } = await awardOf(em, tender);
  const orgs = new Map((await em.find(VendorOrganisation, { id: { $in: result.awards.map((a) => a.vendor) } })).map((o) => [o.id, o]));
  const contracts = new Map((await em.find(Contract, { tender }, { populate: ['lines.region', 'recordedBy'] })).map((c) => [c.vendorOrganisation.id, c]));
  const line = (code: string, quantity: number, unitPrice: number): ContractLineView => ({ region: code, regionName: regions.get(code)?.name ?? code, quantity, unitPrice });
  const waiting = waitingReason(tender, endsAt, now);
  return {
    ...base, standstillEndsAt: endsAt.toISOString(), earliestSignedOn: earliestSignedOn(tender, endsAt), open: waiting === null, waiting,
    vendors: result.awards.map((a) => {
      const c = contracts.get(a.vendor);
      return {
        vendor: { id: a.vendor, name: orgs.get(a.vendor)?.name ?? a.vendor },
        awarded: a.lines.map((l) => line(l.region, l.quantity, l.unitPrice)),
        contract: c ? {
          id: c.id, signedOn: c.signedOn, recordedBy: { id: c.recordedBy.id, name: c.recordedBy.name }, recordedAt: c.createdAt.toISOString(),
          lines: c.lines.getItems().map((l) => line(l.region.code, l.quantity, l.unitPrice)),
        } : null,
      };
    }).sort((x, y) => x.vendor.name.localeCompare(y.vendor.name)),
  };
}

/**
 * Records one awarded vendor's contract, under the tender's lock: notices sent, standstill over, the
 * signature date not before the standstill's end nor in the future, the schedule exactly the awarded
 * regions of that vendor (quantities may differ from the forecast). The last one moves the tender to
 * `contracted` (a guarded transition). Two records of the same vendor's contract: the second is 409.
 */
export async function recordContract(em: EntityManager, user: User, tenderId: string, input: ContractInput, now = new Date()): Promise<ContractsView> {
  await em.transactional(async (tx) => {
    await lockTender(tx, user, tenderId, RECORDING, 'Contracts are recorded once every notice of the approved award is sent, and until the last contract is recorded.');
    const tender = await tx.findOneOrFail(Tender, { id: tenderId });
    const { result, regions, endsAt } = await awardOf(tx, tender);
    if (now < endsAt) throw new ConflictError('The standstill period is running: contracts are recorded after it ends.');
    const award = result.awards.find((a) => a.vendor === input.vendorId);
    if (!award) throw new ValidationError([{ field: 'vendorId', message: 'This vendor was not awarded a part of this tender.' }]);
    if (await tx.count(Contract, { tender: tenderId, vendorOrganisation: input.vendorId })) {
      throw new ConflictError('This vendor’s contract is already recorded.');
    }
    const errors: FieldError[] = [];
    const earliest = earliestSignedOn(tender, endsAt);
    if (input.signedOn < earliest) errors.push({ field: 'signedOn', message: `The contract cannot be signed before the standstill period ends: the earliest signature date is ${earliest}.` });
    if (input.signedOn > localDate(now, tender.timeZone)) errors.push({ field: 'signedOn', message: 'The signature date cannot be in the future.' });
    const awardedRegions = new Set(award.lines.map((l) => l.region));
    const seen = new Set<string>();
    input.lines.forEach((l, i) => {
      if (!awardedRegions.has(l.region)) errors.push({ field: `lines[${i}].region`, message: `Region ${l.region} was not awarded to this vendor.` });
      else if (seen.has(l.region)) errors.push({ field: `lines[${i}].region`, message: `Region ${l.region} is listed twice.` });
      seen.add(l.region);
    });
    const missing = [...awardedRegions].filter((r) => !seen.has(r));
    if (missing.length) errors.push({ field: 'lines', message: `The schedule must cover every region awarded to this vendor; missing: ${missing.join(', ')}.` });
    if (errors.length) throw new ValidationError(errors);

    const contract = tx.create(Contract, { tender: tenderId, vendorOrganisation: input.vendorId, signedOn: input.signedOn, recordedBy: user });
    const position = (code: string) => regions.get(code)!.position;
    [...input.lines].sort((a, b) => position(a.region) - position(b.region)).forEach((l, i) => {
      tx.create(ContractLine, { contract, region: regions.get(l.region)!, quantity: l.quantity, unitPrice: l.unitPrice, position: i });
    });
    await tx.flush();
    await audit(tx, {
      tenderId, actor: user, action: 'contract.recorded', subject: `vendor ${input.vendorId}`,
      detail: { signedOn: input.signedOn, lines: input.lines }, after: { contractId: contract.id },
    });
    const recorded = await tx.count(Contract, { tender: tenderId });
    if (recorded === result.awards.length) {
      await transition(tx, Tender, tenderId, statusesBefore('contracted'), { status: 'contracted' }, 'The tender is no longer awaiting contracts.');
      await audit(tx, { tenderId, actor: user, action: 'tender.contracted', subject: 'tender', detail: { contracts: recorded }, before: { status: 'notified' }, after: { status: 'contracted' } });
    }
  });
  return listContracts(em.fork(), user, tenderId, now);
}
