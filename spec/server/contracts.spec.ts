import type { ContractsView } from '@shared/contracts';
import { codelistCheck, ocdsReferenceAvailable, schemaErrors } from '../support/ocds';
import { AuditEntry, Contract, ContractLine, Recommendation, Tender, type User } from '../../server/entities';
import { addDays, localDate, standstillEnd } from '../../server/services/standstill';
import { type Browser, makeUser, signedIn, startTestApp, type TestApp } from '../support/app';
import { waitForRun } from '../support/evaluation';
import { race } from '../support/race';
import { openTender, passClosingTime, tenderBody } from '../support/tenders';
import { waitFor } from '../support/wait';

/**
 * The standstill settings of a tender and the contract step after the standstill: who may record,
 * when, what is refused (400 naming the field, nothing stored), the race of two records of one
 * contract, and the final state once every awarded vendor's contract is in.
 */
jest.setTimeout(180_000);
let t: TestApp;
let buyer: Browser;
let compliance: Browser;

/**
 * Vendor A is cheapest in R01, B in R02 and R03, C nowhere: the split award goes to A and B (108,200
 * against 110,100 for B alone). No price is more than 20 % below its region's median (none flagged).
 */
const FIGURES = {
  A: { fixedFee: 100, prices: { R01: 18, R02: 20, R03: 20 } },
  B: { fixedFee: 100, prices: { R01: 20, R02: 18, R03: 18 } },
  C: { fixedFee: 100, prices: { R01: 21, R02: 21, R03: 21 } },
};
type Key = keyof typeof FIGURES;

interface Notified { tenderId: string; org: Record<Key, string>; closureDays: string[] }

/** A tender of its own taken to notified: bids, closing, the published basis run, recommended, approved, letters sent. */
async function notifiedTender(): Promise<Notified> {
  const org = {} as Record<Key, string>;
  const vendors = {} as Record<Key, Browser>;
  for (const key of Object.keys(FIGURES) as Key[]) {
    const user: User = await makeUser(t, 'vendor');
    org[key] = user.vendorOrganisation!.id;
    vendors[key] = await signedIn(t, user);
  }
  const tenderId = await openTender(buyer, Object.values(org), tenderBody(3));
  for (const key of Object.keys(FIGURES) as Key[]) {
    const saved = await vendors[key].send('put', `/api/tenders/${tenderId}/bid`, { ...FIGURES[key], capacity: null, submit: true, version: null });
    expect(saved.status).toBe(200);
  }
  await passClosingTime(t, tenderId);
  expect((await buyer.get(`/api/tenders/${tenderId}/bids`)).status).toBe(200);
  // Closure days entered while the tender is closed, before approval: the day the standstill would end, and the next.
  const plain = standstillEnd({ approvedAt: new Date(), days: 10, timeZone: 'UTC', country: 'IE', closureDays: [] }).lastDay;
  const closureDays = [plain, addDays(plain, 1)];
  const set = await buyer.send('put', `/api/tenders/${tenderId}/closure-days`, { closureDays: [...closureDays].reverse() });
  expect({ status: set.status, closureDays: set.body.closureDays }).toEqual({ status: 200, closureDays });
  const scenarios = await buyer.get(`/api/tenders/${tenderId}/scenarios`);
  const basis = scenarios.body.find((s: { builtIn: string | null }) => s.builtIn === 'published');
  const run = await waitForRun(buyer, (await buyer.post(`/api/scenarios/${basis.id}/runs`)).body.id);
  expect(run.result!.awards.map((a) => a.vendor).sort()).toEqual([org.A, org.B].sort());
  expect((await buyer.post(`/api/tenders/${tenderId}/recommendation`, { runId: run.id, justification: 'Least cost.' })).status).toBe(201);
  expect((await compliance.post(`/api/tenders/${tenderId}/recommendation/approve`, { comment: '' })).status).toBe(200);
  expect((await buyer.post(`/api/tenders/${tenderId}/notices`)).status).toBe(202);
  await waitFor('the letters to be sent (tender notified)', async () => (await t.em().findOneOrFail(Tender, { id: tenderId })).status === 'notified');
  return { tenderId, org, closureDays };
}

/** As if the clock had run on: the stored standstill end moved `days` into the past. */
async function standstillOver(tenderId: string, days: number): Promise<Date> {
  const endsAt = new Date(Date.now() - days * 86_400_000);
  await t.em().nativeUpdate(Tender, { id: tenderId }, { standstillEndsAt: endsAt });
  return endsAt;
}

let running: Notified;
let over: Notified;
let overEndsAt: Date;

beforeAll(async () => {
  t = await startTestApp();
  buyer = await signedIn(t, await makeUser(t, 'buyer'));
  compliance = await signedIn(t, await makeUser(t, 'compliance'));
  running = await notifiedTender();
  over = await notifiedTender();
  overEndsAt = await standstillOver(over.tenderId, 5);
});
afterAll(() => t.close());

const contractCount = (tenderId: string) => t.em().count(Contract, { tender: tenderId });
const line = (region: string, quantity: number, unitPrice: number) => ({ region, quantity, unitPrice });

describe('standstill settings of a tender', () => {
  test('a standstill of 0 days without its exemption ground is refused naming standstillExemption, and nothing is stored; with a ground it is kept', async () => {
    const before = await t.em().count(Tender, {});
    const bare = await buyer.post('/api/tenders', tenderBody(2, 60, { standstillDays: 0 }));
    expect({ status: bare.status, type: bare.type, fields: bare.body.errors.map((e: { field: string }) => e.field) }).toEqual({
      status: 400, type: 'application/problem+json', fields: ['standstillExemption'],
    });
    expect(await t.em().count(Tender, {})).toBe(before);
    const ground = 'Framework call-off: no standstill is required under the buyer’s rules.';
    const exempt = await buyer.post('/api/tenders', tenderBody(2, 60, { standstillDays: 0, standstillExemption: ground }));
    expect({ status: exempt.status, days: exempt.body.standstillDays, ground: exempt.body.standstillExemption }).toEqual({ status: 201, days: 0, ground });
  });

  test('closure days must be real dates, each once: 400 naming the entry; a letter locale outside the list is 400 naming locale', async () => {
    const bad = await buyer.send('put', `/api/tenders/${running.tenderId}/closure-days`, { closureDays: ['2026-12-29', '2026-02-30'] });
    expect({ status: bad.status, fields: bad.body.errors.map((e: { field: string }) => e.field) }).toEqual({ status: 400, fields: ['closureDays[1]'] });
    const twice = await buyer.send('put', `/api/tenders/${running.tenderId}/closure-days`, { closureDays: ['2026-12-29', '2026-12-29'] });
    expect({ status: twice.status, fields: twice.body.errors.map((e: { field: string }) => e.field) }).toEqual({ status: 400, fields: ['closureDays'] });
    const locale = await buyer.post('/api/tenders', tenderBody(2, 60, { locale: 'xx-YY' as 'en-GB' }));
    expect({ status: locale.status, fields: locale.body.errors.map((e: { field: string }) => e.field) }).toEqual({ status: 400, fields: ['locale'] });
  });

  test('the approval fixed the standstill end past the buyer’s closure days, and closure days can no longer change (409)', async () => {
    const tender = await t.em().findOneOrFail(Tender, { id: running.tenderId });
    const rec = await t.em().findOneOrFail(Recommendation, { tender: running.tenderId, status: 'approved' });
    const expected = standstillEnd({ approvedAt: rec.decidedAt!, days: 10, timeZone: 'UTC', country: 'IE', closureDays: running.closureDays });
    expect(tender.standstillEndsAt?.toISOString()).toBe(expected.endsAt.toISOString());
    expect(expected.skipped.map((s) => s.reason)).toContain('closure day of the buying body');
    const late = await buyer.send('put', `/api/tenders/${running.tenderId}/closure-days`, { closureDays: [] });
    expect(late.status).toBe(409);
    expect((await t.em().findOneOrFail(Tender, { id: running.tenderId })).closureDays).toEqual(running.closureDays);
  });
});

describe('the contract step', () => {
  test('while the standstill runs, the award is pending: the list says so and recording is 409, nothing stored', async () => {
    const list = await buyer.get(`/api/tenders/${running.tenderId}/contracts`);
    const body = list.body as ContractsView;
    expect({ status: list.status, open: body.open, waiting: body.waiting, vendors: body.vendors.length, contracts: body.vendors.filter((v) => v.contract).length }).toEqual({
      status: 200, open: false, waiting: 'The award is pending: the standstill period is running.', vendors: 2, contracts: 0,
    });
    // Pre-filled from the award: vendor A's schedule is R01 at its own price.
    expect(body.vendors.find((v) => v.vendor.id === running.org.A)!.awarded).toEqual([{ region: 'R01', regionName: 'Depot 1', quantity: 1000, unitPrice: 18 }]);
    const today = localDate(new Date(), 'UTC');
    const early = await buyer.post(`/api/tenders/${running.tenderId}/contracts`, { vendorId: running.org.A, signedOn: today, lines: [line('R01', 1000, 10)] });
    expect({ status: early.status, type: early.type }).toEqual({ status: 409, type: 'application/problem+json' });
    expect(await contractCount(running.tenderId)).toBe(0);
    // Compliance reads the list too.
    expect((await compliance.get(`/api/tenders/${running.tenderId}/contracts`)).status).toBe(200);
  });

  test('after the standstill: a signature date before its end, in the future or not a date, a region not awarded or missing, a vendor not awarded — each 400 naming the field, nothing stored', async () => {
    const lastDay = localDate(overEndsAt, 'UTC');
    const tomorrow = addDays(localDate(new Date(), 'UTC'), 1);
    const ok = { vendorId: over.org.A, signedOn: addDays(lastDay, 1), lines: [line('R01', 1000, 10)] };
    const cases: [string, object, string[]][] = [
      ['signed on the standstill’s last day', { ...ok, signedOn: lastDay }, ['signedOn']],
      ['signed tomorrow', { ...ok, signedOn: tomorrow }, ['signedOn']],
      ['a date that does not exist', { ...ok, signedOn: '2026-02-30' }, ['signedOn']],
      ['a region not awarded to A', { ...ok, lines: [line('R01', 1000, 10), line('R02', 5, 20)] }, ['lines[1].region']],
      ['the awarded region missing', { ...ok, vendorId: over.org.B, lines: [line('R02', 2000, 10)] }, ['lines']],
      ['a vendor not awarded', { ...ok, vendorId: over.org.C }, ['vendorId']],
      ['a quantity of 0', { ...ok, lines: [line('R01', 0, 10)] }, ['lines[0].quantity']],
    ];
    for (const [what, body, fields] of cases) {
      const res = await buyer.post(`/api/tenders/${over.tenderId}/contracts`, body);
      expect({ what, status: res.status, type: res.type, fields: (res.body.errors ?? []).map((e: { field: string }) => e.field) }).toEqual({ what, status: 400, type: 'application/problem+json', fields });
    }
    expect(await contractCount(over.tenderId)).toBe(0);
    expect(await t.em().count(AuditEntry, { tender: over.tenderId, action: 'contract.recorded' })).toBe(0);
  });

  test('two records of the same vendor’s contract at once: one wins, the other is 409; the last contract makes the tender contracted, with its audit entries', async () => {
    const signedOn = addDays(localDate(overEndsAt, 'UTC'), 1);
    const a = { vendorId: over.org.A, signedOn, lines: [line('R01', 950, 10)] };
    const answers = await race(t, over.tenderId, [
      () => buyer.post(`/api/tenders/${over.tenderId}/contracts`, a),
      () => buyer.post(`/api/tenders/${over.tenderId}/contracts`, { ...a, lines: [line('R01', 1200, 10)] }),
    ]);
    expect(answers.map((r) => r.status).sort()).toEqual([201, 409]);
    expect(await contractCount(over.tenderId)).toBe(1);
    expect((await t.em().findOneOrFail(Tender, { id: over.tenderId })).status).toBe('notified');
    // Quantities may differ from the forecast; the regions are the awarded ones.
    const b = await buyer.post(`/api/tenders/${over.tenderId}/contracts`, { vendorId: over.org.B, signedOn, lines: [line('R03', 3100, 9.5), line('R02', 1800, 10)] });
    expect(b.status).toBe(201);
    const view = b.body as ContractsView;
    expect({ status: view.status, open: view.open, waiting: view.waiting }).toEqual({ status: 'contracted', open: false, waiting: 'Every awarded vendor’s contract is recorded.' });
    expect(view.vendors.find((v) => v.vendor.id === over.org.B)!.contract!.lines).toEqual([
      { region: 'R02', regionName: 'Depot 2', quantity: 1800, unitPrice: 10 }, { region: 'R03', regionName: 'Depot 3', quantity: 3100, unitPrice: 9.5 },
    ]);
    expect((await t.em().findOneOrFail(Tender, { id: over.tenderId })).status).toBe('contracted');
    expect(await t.em().count(ContractLine, { contract: { tender: over.tenderId } })).toBe(3);
    const actions = (await t.em().find(AuditEntry, { tender: over.tenderId }, { orderBy: { seq: 'asc' } })).map((e) => e.action);
    expect(actions.slice(-3)).toEqual(['contract.recorded', 'contract.recorded', 'tender.contracted']);
    // Contracted is final: no more records.
    expect((await buyer.post(`/api/tenders/${over.tenderId}/contracts`, { ...a })).status).toBe(409);
    // A vendor sees its outcome (its letter was sent) and the tender's final state.
    expect((await compliance.get(`/api/tenders/${over.tenderId}`)).body.status).toBe('contracted');

    // The open-data package now ends with one contract release per recorded contract, with its schedule.
    const pkg = (await buyer.get(`/api/tenders/${over.tenderId}/ocds`)).body as { releases: { tag: string[]; contracts?: { items?: { quantity: number; unit: { value: { amount: number } } }[] }[] }[] };
    const contractReleases = pkg.releases.filter((r) => r.tag.includes('contract'));
    expect(contractReleases).toHaveLength(2);
    // Each release shows the whole picture at its date: the last one carries both contracts.
    const items = (contractReleases.at(-1)!.contracts ?? []).flatMap((c) => c.items ?? []);
    // Either of the two racing records may have won (answers come in the order the requests were made).
    const won = answers[0].status === 201 ? 950 : 1200;
    expect(items.map((i) => [i.quantity, i.unit.value.amount]).sort((x, y) => x[0] - y[0])).toEqual([[won, 10], [1800, 10], [3100, 9.5]]);
    if (ocdsReferenceAvailable()) {
      // OCDS 1.1.5 release package schema, ../shared/reference/ocds-1.1.5 (skipped where the folder is absent).
      expect(schemaErrors(pkg)).toEqual([]);
      expect(codelistCheck(pkg).problems).toEqual([]);
    }
  });
});
