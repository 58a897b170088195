import { randomUUID } from 'node:crypto';
import type { DebriefView, ExplanationView } from '@shared/explanation';
import { AuditEntry, RunDebrief, RunExplanation, RunRegionCheck, VendorOrganisation, type User } from '../../server/entities';
import { QUEUES } from '../../server/jobs/queue';
import { type Browser, makeUser, signedIn, startTestApp, type TestApp } from '../support/app';
import { waitForRun } from '../support/evaluation';
import { openTender, passClosingTime, tenderBody } from '../support/tenders';
import { drainQueue } from '../support/wait';

/**
 * The explanation and debrief of a run through the API, on the solve queue, with the real engine and
 * PostgreSQL. One hand-worked tender (sole award, forecasts R01 1,000 t and R02 2,000 t):
 *   A: fee 0, R01 @10, R02 @10 → the run gives A both regions: 30,000.
 *   B: fee 5,000, R01 @7 only → forced into R01: 5,000 + 7,000 + A's R02 20,000 = 32,000, 2,000 more:
 *      its fee is not recovered; it would have won R01 below 7 − 2,000 / 1,000 = 5.00, so at 4.99;
 *      a uniform cut r wins once 12,000 · (1 − r) + 20,000 < 30,000, r > 1/6: 16.7 %.
 */
jest.setTimeout(180_000);
let t: TestApp;
let buyer: Browser;
let compliance: Browser;
let vendorB: Browser;
let userA: User;
let userB: User;
let tenderId: string;
let runId: string;

beforeAll(async () => {
  t = await startTestApp();
  buyer = await signedIn(t, await makeUser(t, 'buyer'));
  compliance = await signedIn(t, await makeUser(t, 'compliance'));
  userA = await makeUser(t, 'vendor');
  userB = await makeUser(t, 'vendor');
  // Fictional firm names, as the problem file and the explanation's words carry them.
  await t.em().nativeUpdate(VendorOrganisation, { id: userA.vendorOrganisation!.id }, { name: 'Ashgrove Salt' });
  await t.em().nativeUpdate(VendorOrganisation, { id: userB.vendorOrganisation!.id }, { name: 'Birchfield Minerals' });
  const vendorA = await signedIn(t, userA);
  vendorB = await signedIn(t, userB);
  tenderId = await openTender(buyer, [userA.vendorOrganisation!.id, userB.vendorOrganisation!.id],
    tenderBody(2, 60, { awardBasis: { sourcing: 'sole', soleRegions: [] } }));
  const a = await vendorA.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 0, capacity: null, prices: { R01: 10, R02: 10 }, submit: true, version: null });
  const b = await vendorB.send('put', `/api/tenders/${tenderId}/bid`, { fixedFee: 5000, capacity: null, prices: { R01: 7 }, submit: true, version: null });
  expect([a.status, b.status]).toEqual([200, 200]);
  await passClosingTime(t, tenderId);
  const scenarios = (await buyer.get(`/api/tenders/${tenderId}/scenarios`)).body as { id: string; builtIn: string }[];
  const published = scenarios.find((s) => s.builtIn === 'published')!;
  const run = await waitForRun(buyer, (await buyer.post(`/api/scenarios/${published.id}/runs`)).body.id);
  expect([run.status, run.result!.objective]).toEqual(['optimal', 30000]);
  runId = run.id;
});
afterAll(() => t.close());

test('before anyone asks, the explanation is not started and no row exists; a region cannot be worked out exactly yet (409, nothing stored)', async () => {
  const res = await compliance.get(`/api/runs/${runId}/explanation`);
  expect(res.status).toBe(200);
  expect(res.body).toEqual({ runId, status: 'not-started', progress: { done: 0, total: 0 }, result: null, error: null, queuedAt: null, computedAt: null, debriefs: [], regionChecks: [] });
  const early = await buyer.post(`/api/runs/${runId}/explanation/regions/R01`);
  expect([early.status, early.body.detail]).toEqual([409, 'Ask for the explanation first; a region is worked out exactly once the explanation is done.']);
  expect(await t.em().fork().count(RunRegionCheck, { run: runId })).toBe(0);
});

describe('asked for once, computed on the solve queue', () => {
  let first: { status: number; body: ExplanationView };
  let second: { status: number; body: ExplanationView };
  let done: ExplanationView;
  beforeAll(async () => {
    first = await buyer.post(`/api/runs/${runId}/explanation`);
    second = await compliance.post(`/api/runs/${runId}/explanation`);
    await drainQueue(t, QUEUES.solve, 150_000);
    done = (await buyer.get(`/api/runs/${runId}/explanation`)).body as ExplanationView;
  });

  test('the first request queues it (202), the second answers the same one (200) and queues nothing', async () => {
    expect([first.status, first.body.status]).toEqual([202, 'queued']);
    expect(second.status).toBe(200);
    expect(await t.em().fork().count(RunExplanation, { run: runId })).toBe(1);
    const queued = await t.em().fork().count(AuditEntry, { tender: tenderId, action: 'run.explanation-queued' });
    expect(queued).toBe(1);
  });

  test('done: region R01 says B was not awarded because its fee 5,000 is not recovered (32,000 − 30,000 = 2,000 more)', () => {
    expect(done.status).toBe('done');
    expect(done.progress.done).toBe(done.progress.total);
    const r01 = done.result!.regions.find((r) => r.region === 'R01')!;
    expect(r01.awarded).toEqual([{ vendor: userA.vendorOrganisation!.id, vendorName: 'Ashgrove Salt', quantity: 1000, unitPrice: 10 }]);
    expect(r01.challenger).toEqual({
      vendor: userB.vendorOrganisation!.id, vendorName: 'Birchfield Minerals', unitPrice: 7, reason: 'fixedFee',
      words: 'Birchfield Minerals bid €7.00 per t but was not awarded it: its fixed fee would not be recovered by its lower unit price; it would have cost €2,000.00 more.',
      extraCost: 2000, exact: true, extraCostAtLeast: null,
    });
    // Nobody else bid R02.
    expect(done.result!.regions.find((r) => r.region === 'R02')!.challenger).toBeNull();
  });

  test('the explanation offers a debrief for B (no award) and none for A (it won every region it bid)', () => {
    expect(done.result!.debriefVendors).toEqual([{ vendor: userB.vendorOrganisation!.id, vendorName: 'Birchfield Minerals', awarded: false }]);
    expect(done.debriefs).toEqual([]);
  });

  test('the finished explanation is in the audit trail with the number of re-solves', async () => {
    const entry = await t.em().fork().findOneOrFail(AuditEntry, { tender: tenderId, action: 'run.explained' });
    expect(entry.detail).toEqual({ solves: done.result!.solves, seconds: done.result!.seconds });
    expect(done.result!.solves).toBeGreaterThan(1);
  });
});

describe("B's debrief, asked for on its own, computed on the solve queue and cached", () => {
  let first: { status: number; body: DebriefView };
  let second: { status: number; body: DebriefView };
  let view: ExplanationView;
  beforeAll(async () => {
    const b = userB.vendorOrganisation!.id;
    first = await buyer.post(`/api/runs/${runId}/debrief/${b}`);
    second = await compliance.post(`/api/runs/${runId}/debrief/${b}`);
    await drainQueue(t, QUEUES.solve, 150_000);
    view = (await compliance.get(`/api/runs/${runId}/explanation`)).body as ExplanationView;
  });

  test('the first request queues it (202), the second answers the same one (200); one row, one audit entry', async () => {
    expect([first.status, first.body.status, first.body.vendor]).toEqual([202, 'queued', userB.vendorOrganisation!.id]);
    expect(second.status).toBe(200);
    expect(await t.em().fork().count(RunDebrief, { run: runId })).toBe(1);
    expect(await t.em().fork().count(AuditEntry, { tender: tenderId, action: 'run.debrief-queued' })).toBe(1);
    expect(await t.em().fork().count(AuditEntry, { tender: tenderId, action: 'run.debriefed' })).toBe(1);
  });

  test("B: R01 at 4.99 or less (7 − 2,000 / 1,000 = 5.00, a tie), and a uniform cut of 16.7 % (1/6 rounded up)", () => {
    expect(view.debriefs).toHaveLength(1);
    const d = view.debriefs[0];
    expect([d.status, d.progress.done, d.progress.total]).toEqual(['done', 2, 2]);
    const b = d.result!;
    expect(b.awarded).toBe(false);
    expect(b.regions.map((r) => [r.region, r.neededPrice, r.tolerance])).toEqual([['R01', 4.99, 'cent']]);
    expect(b.uniformReduction).toEqual({ fraction: 0.167, tolerance: 'percent', words: 'A cut of 16.7 % to all its prices, fixed fee included, would have won it an award.' });
  });

  test('a vendor without a bid in the run gets no debrief: 404, nothing stored', async () => {
    const res = await buyer.post(`/api/runs/${runId}/debrief/${randomUUID()}`);
    expect([res.status, res.headers['content-type']]).toEqual([404, 'application/problem+json; charset=utf-8']);
    expect(await t.em().fork().count(RunDebrief, { run: runId })).toBe(1);
  });
});

describe('one region worked out exactly on demand, on the solve queue, cached and laid over the explanation', () => {
  let first: { status: number; body: ExplanationView };
  let second: { status: number; body: ExplanationView };
  let view: ExplanationView;
  beforeAll(async () => {
    // The explanation is done (the describe above, or here if run alone).
    await buyer.post(`/api/runs/${runId}/explanation`);
    await drainQueue(t, QUEUES.solve, 150_000);
    first = await buyer.post(`/api/runs/${runId}/explanation/regions/R01`);
    second = await compliance.post(`/api/runs/${runId}/explanation/regions/R01`);
    await drainQueue(t, QUEUES.solve, 150_000);
    view = (await compliance.get(`/api/runs/${runId}/explanation`)).body as ExplanationView;
  });

  test('the first request queues it (202), the second answers the same one (200); one row, one audit entry each for asking and working out', async () => {
    expect(first.status).toBe(202);
    expect(first.body.regionChecks.map((c) => [c.region, c.status])).toEqual([['R01', 'queued']]);
    expect(second.status).toBe(200);
    expect(await t.em().fork().count(RunRegionCheck, { run: runId })).toBe(1);
    expect(await t.em().fork().count(AuditEntry, { tender: tenderId, action: 'run.region-check-queued' })).toBe(1);
    const done = await t.em().fork().findOneOrFail(AuditEntry, { tender: tenderId, action: 'run.region-checked' });
    expect(done.detail).toEqual({ region: 'R01', exact: true });
  });

  test('done: R01 re-solved with B forced in costs 2,000 more (32,000 − 30,000), exact, and the explanation shows that figure', () => {
    expect(view.regionChecks).toHaveLength(1);
    const check = view.regionChecks[0];
    expect([check.region, check.status, check.error]).toEqual(['R01', 'done', null]);
    expect(check.computedAt).not.toBeNull();
    expect(check.result!.challenger).toEqual(expect.objectContaining({ vendor: userB.vendorOrganisation!.id, reason: 'fixedFee', extraCost: 2000, exact: true, extraCostAtLeast: null }));
    expect(view.result!.regions.find((r) => r.region === 'R01')).toEqual(check.result);
    expect(view.result!.ranges).toBe(0);
  });

  test('a region no compliant bid lost (R02) or not in the tender has nothing to work out: 404, nothing stored', async () => {
    const r02 = await buyer.post(`/api/runs/${runId}/explanation/regions/R02`);
    const none = await buyer.post(`/api/runs/${runId}/explanation/regions/R99`);
    expect([r02.status, none.status]).toEqual([404, 404]);
    expect(await t.em().fork().count(RunRegionCheck, { run: runId })).toBe(1);
  });
});

test('a vendor never gets the explanation, the debrief or a region worked out (403), even its own', async () => {
  const res = await vendorB.get(`/api/runs/${runId}/explanation`);
  expect(res.status).toBe(403);
  expect(JSON.stringify(res.body)).not.toContain('4.99');
  const asked = await vendorB.post(`/api/runs/${runId}/debrief/${userB.vendorOrganisation!.id}`);
  expect(asked.status).toBe(403);
  expect(JSON.stringify(asked.body)).not.toContain('4.99');
  const region = await vendorB.post(`/api/runs/${runId}/explanation/regions/R01`);
  expect(region.status).toBe(403);
  expect(JSON.stringify(region.body)).not.toContain('2000');
});

test('a run without an award cannot be explained: 409, nothing stored', async () => {
  // At most 10 % of the volume per vendor cannot be met by two vendors: infeasible.
  const made = await buyer.post(`/api/tenders/${tenderId}/scenarios`, { name: 'Impossible share', rules: { sourcing: 'sole', maxVendorShare: 0.1 } });
  expect(made.status).toBe(201);
  const run = await waitForRun(buyer, (await buyer.post(`/api/scenarios/${made.body.id}/runs`)).body.id);
  expect(run.status).toBe('infeasible');
  const res = await buyer.post(`/api/runs/${run.id}/explanation`);
  expect([res.status, res.headers['content-type']]).toEqual([409, 'application/problem+json; charset=utf-8']);
  expect(await t.em().fork().count(RunExplanation, { run: run.id })).toBe(0);
});

test('the API document gives the shape of the explanation', async () => {
  const res = await buyer.get('/api/openapi.json');
  const schema = res.body.paths['/api/runs/{id}/explanation'].get.responses['200'].content['application/json'].schema;
  expect(schema.properties.status.enum).toEqual(['not-started', 'queued', 'running', 'done', 'failed']);
  expect(res.body.paths['/api/runs/{id}/explanation'].post['x-roles']).toEqual(['buyer', 'compliance']);
});
