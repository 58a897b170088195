import type { RunView, ScenarioView } from '@shared/evaluation';
import { AuditEntry, Bid, Tender, User } from '../../server/entities';
import { seed } from '../../server/ops/seed';
import { DEMO_PASSWORD } from '../../seeds/demo-people';
import { Browser, makeUser, signedIn, startTestApp, type TestApp } from '../support/app';
import { waitForRun } from '../support/evaluation';
import { waitFor } from '../support/wait';
import { openTender, passClosingTime, tenderBody } from '../support/tenders';

/** The buyer → compliance flow on the demo salt tender, through the API with the real engine. */
jest.setTimeout(120_000);
let t: TestApp;
let buyer: Browser;
let compliance: Browser;
let tenderId: string;
let scenarios: ScenarioView[];
const runs: Record<string, RunView> = {};

async function demo(email: string): Promise<Browser> {
  const b = await new Browser(t.app).init();
  const res = await b.signIn(email, DEMO_PASSWORD);
  if (res.status !== 200) throw new Error(`sign-in ${email}: ${res.status}`);
  return b;
}

async function run(scenarioId: string): Promise<RunView> {
  const res = await buyer.post(`/api/scenarios/${scenarioId}/runs`);
  expect(res.status).toBe(202);
  expect(res.body.status).toBe('queued');
  return waitForRun(buyer, res.body.id);
}

beforeAll(async () => {
  t = await startTestApp();
  await seed(t.em(), 'demo');
  buyer = await demo('buyer@demo.tendara.test');
  compliance = await demo('compliance@demo.tendara.test');
  tenderId = (await t.em().findOneOrFail(Tender, { reference: 'NHP-2026-014' })).id;
  // The built-in scenarios and their runs, which several tests read (set up here, not by a test).
  const res = await compliance.get(`/api/tenders/${tenderId}/scenarios`);
  expect(res.status).toBe(200);
  scenarios = res.body;
  for (const s of scenarios) runs[s.builtIn!] = await run(s.id);
});
afterAll(() => t.close());

test('a closed tender starts with its published award basis first, then all regions split and all regions sole as what-ifs', () => {
  // The demo salt tender's basis: split award, at most four vendors, none above 45 % of the total.
  expect(scenarios.map((s) => [s.name, s.builtIn, s.rules.sourcing, s.awardable])).toEqual([
    ['Published award basis', 'published', 'split', true], ['All regions split', 'split', 'split', false], ['All regions sole', 'sole', 'sole', false],
  ]);
  expect(scenarios[0].rules).toEqual({ sourcing: 'split', soleRegions: [], maxVendors: 4, maxVendorShare: 0.45, exclude: [], require: [] });
});

test('the published basis run meets its rules: at most four vendors, none above 45 % of the total', () => {
  const r = runs['published'];
  expect(r.status).toBe('optimal');
  expect(r.result!.awards.length).toBeLessThanOrEqual(4);
  for (const a of r.result!.awards) expect(a.share).toBeLessThanOrEqual(0.45 + 1e-9);
  expect(r.result!.objective!).toBeGreaterThanOrEqual(runs['split'].result!.objective! - 1e-6);
});

test('scenarios cannot be built on an open tender: the bids are still sealed', async () => {
  const firm = await makeUser(t, 'vendor');
  const open = await openTender(buyer, [firm.vendorOrganisation!.id]);
  const res = await buyer.get(`/api/tenders/${open}/scenarios`);
  expect(res.status).toBe(409);
});

test('split and sole runs finish optimal; each objective is recomputed from the stored bids', async () => {
  const bids = await t.em().find(Bid, { tender: tenderId }, { populate: ['lines.region', 'vendorOrganisation'] });
  const tender = await t.em().findOneOrFail(Tender, { id: tenderId }, { populate: ['regions'] });
  for (const kind of ['split', 'sole']) {
    const r = runs[kind];
    expect(r.status).toBe('optimal');
    let total = 0;
    const supplied = new Map<string, number>();
    for (const a of r.result!.awards) {
      const bid = bids.find((b) => b.vendorOrganisation.id === a.vendor)!;
      total += bid.fixedFee;
      for (const l of a.lines) {
        const price = bid.lines.getItems().find((x) => x.region.code === l.region)!.unitPrice;
        expect(l.unitPrice).toBe(price);
        total += price * l.quantity;
        supplied.set(l.region, (supplied.get(l.region) ?? 0) + l.quantity);
      }
    }
    expect(r.result!.objective).toBeCloseTo(total, 4);
    for (const region of tender.regions) expect(supplied.get(region.code)).toBeCloseTo(region.forecast, 6);
    if (kind === 'sole') for (const region of tender.regions) {
      expect(r.result!.awards.filter((a) => a.lines.some((l) => l.region === region.code && l.quantity > 0))).toHaveLength(1);
    }
  }
});

test('the demo figures make split and sole differ, and the cost of sole award is never negative', async () => {
  const res = await compliance.get(`/api/tenders/${tenderId}/compare`).query({ runs: `${runs['split'].id},${runs['sole'].id}` });
  expect(res.status).toBe(200);
  const { costOfSoleAward, runs: cols, baseline } = res.body;
  expect(baseline.runId).toBe(runs['split'].id);
  // Both runs proven best: one exact amount, low = high.
  expect(costOfSoleAward.exact).toBe(true);
  expect(costOfSoleAward.low).toBeGreaterThan(0);
  expect(costOfSoleAward.low).toBeCloseTo(runs['sole'].result!.objective! - runs['split'].result!.objective!, 4);
  expect(costOfSoleAward.high).toBe(costOfSoleAward.low);
  expect(cols[0].priceOverSplit).toBe(0);
  expect(cols[1].regionsSplit).toBe(0);
});

test('a rule never lowers the optimum: at most two vendors costs at least the plain split', async () => {
  const created = await buyer.post(`/api/tenders/${tenderId}/scenarios`, { name: 'Two vendors at most', rules: { sourcing: 'split', maxVendors: 2 } });
  expect(created.status).toBe(201);
  const r = await run(created.body.id);
  expect(['optimal', 'infeasible']).toContain(r.status);
  if (r.status === 'optimal') {
    expect(r.result!.awards.length).toBeLessThanOrEqual(2);
    expect(r.result!.objective!).toBeGreaterThanOrEqual(runs['split'].result!.objective! - 1e-6);
  }
});

test('bad rules are refused naming the field', async () => {
  const res = await buyer.post(`/api/tenders/${tenderId}/scenarios`, { name: 'Bad', rules: { sourcing: 'sole', maxVendorShare: 1.5, soleRegions: ['NOPE'] } });
  expect(res.status).toBe(400);
  expect(res.body.errors.map((e: { field: string }) => e.field)).toContain('rules.maxVendorShare');
  const unknown = await buyer.post(`/api/tenders/${tenderId}/scenarios`, { name: 'Bad 2', rules: { soleRegions: ['NOPE'] } });
  expect(unknown.status).toBe(400);
  expect(unknown.body.errors).toEqual([{ field: 'rules.soleRegions[0]', message: 'Region NOPE is not part of this tender.' }]);
});

test('resilience: the award re-solved without each awarded vendor, the worst case marked', async () => {
  const split = runs['split'];
  const res = await compliance.post(`/api/runs/${split.id}/resilience`);
  expect(res.status).toBe(202);
  expect(res.body.queued).toBe(split.result!.awards.length);
  const view = await waitFor('every resilience re-solve to finish', async () => {
    const body = (await compliance.get(`/api/runs/${split.id}/resilience`)).body;
    return body.rows.every((r: { status: string }) => !['queued', 'solving'].includes(r.status)) && body;
  }, { everyMs: 250 });
  expect(view.rows).toHaveLength(split.result!.awards.length);
  for (const row of view.rows) {
    if (row.status === 'optimal') expect(row.increase).toBeGreaterThanOrEqual(-1e-6);
  }
  expect(view.rows.filter((r: { worst: boolean }) => r.worst)).toHaveLength(1);
});

test('four-eyes: the person who recommended can never approve, even with the compliance role', async () => {
  const rec = await buyer.post(`/api/tenders/${tenderId}/recommendation`, { runId: runs['published'].id, justification: 'Least total cost on the published award basis.' });
  expect(rec.status).toBe(201);
  expect(rec.body.status).toBe('recommended');
  // Someone recommends, then is made a compliance officer: still not allowed to approve their own.
  const em = t.em();
  const buyerUser = await em.findOneOrFail(User, { email: 'buyer@demo.tendara.test' });
  await em.nativeUpdate(User, { id: buyerUser.id }, { role: 'compliance' });
  try {
    const self = await buyer.post(`/api/tenders/${tenderId}/recommendation/approve`, { comment: 'ok' });
    expect(self.status).toBe(403);
    expect(self.body.detail).toMatch(/four-eyes/);
  } finally {
    await em.nativeUpdate(User, { id: buyerUser.id }, { role: 'buyer' });
  }
  const ret = await compliance.post(`/api/tenders/${tenderId}/recommendation/return`, {});
  expect(ret.status).toBe(400);
  expect(ret.body.errors[0].field).toBe('comment');
});

test('a returned recommendation stays in the history when the buyer recommends again', async () => {
  const returned = await compliance.post(`/api/tenders/${tenderId}/recommendation/return`, { comment: 'Please say why the fee of the smallest vendor was accepted.' });
  expect(returned.status).toBe(200);
  const again = await buyer.post(`/api/tenders/${tenderId}/recommendation`, { runId: runs['published'].id, justification: 'Least total cost on the published award basis; the fee is below the median.' });
  expect(again.status).toBe(201);
  const answer = (await compliance.get(`/api/tenders/${tenderId}/recommendation`)).body;
  expect(answer.recommendation).toMatchObject({ id: again.body.id, status: 'recommended' });
  expect(answer.history).toEqual([
    expect.objectContaining({ status: 'returned', justification: 'Least total cost on the published award basis.', comment: 'Please say why the fee of the smallest vendor was accepted.', decidedBy: expect.objectContaining({ name: 'Priya Castell' }) }),
  ]);
});

test('approval by compliance awards the tender and freezes its scenarios', async () => {
  const res = await compliance.post(`/api/tenders/${tenderId}/recommendation/approve`, { comment: 'Checked against the rules.' });
  expect(res.status).toBe(200);
  expect(res.body).toMatchObject({ status: 'approved', decidedBy: { name: 'Priya Castell' } });
  expect((await buyer.get(`/api/tenders/${tenderId}`)).body.status).toBe('awarded');
  expect((await buyer.post(`/api/scenarios/${scenarios[0].id}/runs`)).status).toBe(409);
  expect((await buyer.post(`/api/tenders/${tenderId}/scenarios`, { name: 'Late', rules: {} })).status).toBe(409);
});

test('the audit trail records every decision, verifies, refuses changes, and shows tampering', async () => {
  const trail = (await compliance.get(`/api/tenders/${tenderId}/audit`)).body;
  const actions = trail.map((e: { action: string }) => e.action);
  expect(actions).toEqual(expect.arrayContaining(['run.queued', 'run.finished', 'scenario.created', 'recommendation.made', 'recommendation.approved']));
  expect((await compliance.get(`/api/tenders/${tenderId}/audit/verify`)).body).toMatchObject({ ok: true, brokenAt: null });
  const conn = t.em().getConnection();
  await expect(conn.execute(`update audit_entry set action = 'x' where tender_id = ?`, [tenderId])).rejects.toThrow(/append-only/);
  // Someone with the database owner's rights switches the guard off and rewrites history:
  const victim = trail[2] as { seq: number; number: number };
  await conn.execute(`alter table audit_entry disable trigger audit_entry_no_change`);
  await conn.execute(`update audit_entry set detail = '{"comment":"changed"}'::jsonb where seq = ?`, [victim.seq]);
  await conn.execute(`alter table audit_entry enable trigger audit_entry_no_change`);
  // Reported by its number in the tender's own trail (the third entry), as the screen shows it.
  expect(victim.number).toBe(3);
  expect((await compliance.get(`/api/tenders/${tenderId}/audit/verify`)).body).toMatchObject({ ok: false, brokenAt: 3 });
  expect(await t.em().count(AuditEntry, { tender: tenderId })).toBe(trail.length);
});

test('the audit CSV is safe against spreadsheet formula injection', async () => {
  const other = await makeUser(t, 'buyer', { name: '=HYPERLINK("http://evil.test","x")' });
  const b = await signedIn(t, other);
  const open = await t.em().findOneOrFail(Tender, { reference: 'NHP-2027-002' });
  // Handed to that buyer (a buyer evaluates only its own tenders), and its closing time passed.
  await t.em().nativeUpdate(Tender, { id: open.id }, { createdBy: other.id });
  await passClosingTime(t, open.id);
  await b.get(`/api/tenders/${open.id}`);
  const s = await b.post(`/api/tenders/${open.id}/scenarios`, { name: '+cmd|calc', rules: {} });
  expect(s.status).toBe(201);
  const csv = await compliance.get(`/api/tenders/${open.id}/audit.csv`);
  expect(csv.status).toBe(200);
  expect(csv.text).toContain(`"'=HYPERLINK(""http://evil.test"",""x"")"`);
  expect(csv.text).not.toMatch(/(^|,)"[=+\-@]/m);
});

test('before closing, a bid appears in the trail only as having arrived: its revision and receipt time, no figures, no receipt digest, no vendor', async () => {
  const firm = await makeUser(t, 'vendor');
  const vendor = await signedIn(t, firm);
  const open = { id: await openTender(buyer, [firm.vendorOrganisation!.id]) };
  const bid = await vendor.send('put', `/api/tenders/${open.id}/bid`, { fixedFee: 123.45, capacity: null, prices: { R01: 81.5 }, submit: true, version: null });
  expect(bid.status).toBe(200);
  const openTrail = (await buyer.get(`/api/tenders/${open.id}/audit`)).body as { action: string; detail: Record<string, unknown>; actor: unknown }[];
  const entry = openTrail.find((e) => e.action === 'bid.submitted')!;
  expect(entry.detail).toEqual({ revision: 1, receivedAt: bid.body.submittedAt });
  expect(entry.actor).toBeNull();
  expect(JSON.stringify(openTrail)).not.toContain('81.5');
  expect(JSON.stringify(openTrail)).not.toContain(bid.body.digest);
  // In words, without the vendor's name while sealed; named once bidding has closed.
  expect((entry as unknown as { description: string }).description).toBe('Bid received (revision 1)');
  // (The invitation entry names invited firms; who actually bid is not said until closing.)
  expect(openTrail.filter((e) => e.action.startsWith('bid.')).map((e) => JSON.stringify(e)).join()).not.toContain(firm.vendorOrganisation!.name);
  await passClosingTime(t, open.id);
  const closedTrail = (await buyer.get(`/api/tenders/${open.id}/audit`)).body as { action: string; description: string }[];
  expect(closedTrail.find((e) => e.action === 'bid.submitted')!.description).toBe(`Bid received from ${firm.vendorOrganisation!.name} (revision 1)`);
});

test('a tender\'s trail is numbered 1, 2, 3… without gaps although other tenders write in between, and reads in words', async () => {
  const firm = await makeUser(t, 'vendor');
  const a = (await buyer.post('/api/tenders', tenderBody(3, 60, { timeZone: 'Europe/Dublin' }))).body.id as string;
  const b = await openTender(buyer, [firm.vendorOrganisation!.id]);
  expect((await buyer.post(`/api/tenders/${a}/invitations`, { vendorOrganisationIds: [firm.vendorOrganisation!.id] })).status).toBe(200);
  expect((await buyer.post(`/api/tenders/${a}/publish`)).status).toBe(200);
  const trail = (await buyer.get(`/api/tenders/${a}/audit`)).body as { number: number; seq: number; description: string }[];
  expect(trail.map((e) => e.number)).toEqual(trail.map((_, i) => i + 1));
  // The store's sequence is shared, so tender b's entries sit between a's: the numbers are a's own.
  const seqs = trail.map((e) => e.seq);
  expect(seqs[seqs.length - 1] - seqs[0]).toBeGreaterThan(trail.length - 1);
  expect(trail.map((e) => e.description)).toEqual(expect.arrayContaining(['Tender created as a draft', 'Tender published and opened for bids']));
  const csv = await buyer.get(`/api/tenders/${a}/audit.csv`);
  const [header, first] = csv.text.replace(/^\uFEFF/, '').split('\r\n');
  expect(header).toBe('"No.","Time (Europe/Dublin)","Who","Role","What happened","Details","Time (UTC, ISO 8601)","Action code","Before digest","After digest","Hash"');
  // The time in the one date-time format, without the zone named in the heading.
  expect(first).toMatch(/^1,"[A-Z][a-z]{2}, \d{1,2} [A-Z][a-z]{2} \d{4}, \d{2}:\d{2}:\d{2} (GMT|IST)","[^"]+","Buyer","Tender created as a draft",/);
  expect(b).not.toBe(a);
});
