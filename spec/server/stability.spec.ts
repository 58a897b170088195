import XlsxPopulate from 'xlsx-populate';
import type { AwardProblem } from '@shared/award';
import type { ResilienceView, RunView, SensitivityView } from '@shared/evaluation';
import { solveAward } from '../../server/award';
import { AuditEntry, Run, Tender } from '../../server/entities';
import { QUEUES } from '../../server/jobs/queue';
import { seed } from '../../server/ops/seed';
import { DEMO_PASSWORD } from '../../seeds/demo-people';
import { Browser, makeUser, signedIn, startTestApp, type TestApp } from '../support/app';
import { waitForRun } from '../support/evaluation';
import { openTender, passClosingTime, tenderBody } from '../support/tenders';
import { drainQueue, waitFor } from '../support/wait';

/**
 * Issue 14, point 3: how stable an award is. Forecast sensitivity (re-solves of the run's own
 * problem with the forecasts scaled) and the drop-out check (re-solves without each awarded
 * vendor), through the API on real PostgreSQL with the real engine on the solve queue.
 */
jest.setTimeout(240_000);
let t: TestApp;
let buyer: Browser;
let compliance: Browser;

beforeAll(async () => {
  t = await startTestApp();
  buyer = await signedIn(t, await makeUser(t, 'buyer'));
  compliance = await signedIn(t, await makeUser(t, 'compliance'));
});
afterAll(() => t.close());

interface Firm { orgId: string; name: string }

/** A closed tender with these bids (capacity null = no cap); vendors keyed by letter. */
async function closedTender(regions: number, figures: Record<string, { fixedFee: number; capacity: number | null; prices: Record<string, number> }>, overrides = {}) {
  const firms: Record<string, Firm> = {};
  const browsers: Record<string, Browser> = {};
  for (const key of Object.keys(figures)) {
    const user = await makeUser(t, 'vendor');
    firms[key] = { orgId: user.vendorOrganisation!.id, name: user.vendorOrganisation!.name };
    browsers[key] = await signedIn(t, user);
  }
  const tenderId = await openTender(buyer, Object.values(firms).map((f) => f.orgId), tenderBody(regions, 60, overrides));
  for (const key of Object.keys(figures)) {
    const saved = await browsers[key].send('put', `/api/tenders/${tenderId}/bid`, { ...figures[key], submit: true, version: null });
    expect(saved.status).toBe(200);
  }
  await passClosingTime(t, tenderId);
  expect((await buyer.get(`/api/tenders/${tenderId}/bids`)).status).toBe(200);
  return { tenderId, firms };
}

async function builtInRun(tenderId: string, kind: 'split' | 'sole' | 'published'): Promise<RunView> {
  const scenarios = await buyer.get(`/api/tenders/${tenderId}/scenarios`);
  const scenario = scenarios.body.find((s: { builtIn: string | null }) => s.builtIn === kind);
  const queued = await buyer.post(`/api/scenarios/${scenario.id}/runs`);
  expect([200, 202]).toContain(queued.status);
  return waitForRun(buyer, queued.body.id);
}

async function sensitivityDone(runId: string, regionCode: string | null = null): Promise<SensitivityView> {
  return waitFor(`sensitivity of run ${runId}`, async () => {
    const res = await buyer.get(`/api/runs/${runId}/sensitivity`);
    expect(res.status).toBe(200);
    const view = res.body as SensitivityView;
    const check = regionCode === null ? view.all : view.regions.find((r) => r.regionCode === regionCode);
    return check && check.pending === 0 && check.cases.length === 4 ? view : null;
  }, { timeoutMs: 200_000, everyMs: 250 });
}

async function resilienceDone(runId: string, rows: number): Promise<ResilienceView> {
  return waitFor(`resilience of run ${runId}`, async () => {
    const view = (await compliance.get(`/api/runs/${runId}/resilience`)).body as ResilienceView;
    return view.rows.length === rows && view.rows.every((r) => !['queued', 'solving'].includes(r.status)) ? view : null;
  }, { timeoutMs: 200_000, everyMs: 250 });
}

describe('forecast sensitivity', () => {
  /**
   * One region R01 of 1,000 t. A: no fee, €10/t, capacity cap 1,050 t. B: fee €500, €12/t, no cap.
   * A alone covers the forecast up to 1,050 t: 800 t → €8,000 (−20 %), 900 t → €9,000 (−10 %),
   * 1,000 t → €10,000 (the run). At +10 % (1,100 t) A's cap leaves 50 t to B: 10,500 + 500 + 600 =
   * €11,600 (B alone would be 500 + 13,200 = €13,700); at +20 % (1,200 t): 10,500 + 500 + 1,800 = €12,800.
   */
  const FIGURES = {
    A: { fixedFee: 0, capacity: 1050, prices: { R01: 10 } },
    B: { fixedFee: 500, capacity: null, prices: { R01: 12 } },
  };

  test('A (no fee, €10/t, cap 1,050 t) alone wins 1,000 t up to 1,050 t, so the same vendor wins from −20 % to 0 %; at +10 % (1,100 t) B must add 50 t: totals 8,000 / 9,000 / 11,600 / 12,800', async () => {
    const { tenderId, firms } = await closedTender(1, FIGURES);
    const run = await builtInRun(tenderId, 'split');
    expect(run.result!.objective).toBe(10_000);
    const posted = await buyer.post(`/api/runs/${run.id}/sensitivity`, {});
    expect(posted.status).toBe(202);
    expect(posted.body).toEqual({ queued: 4 });
    const view = await sensitivityDone(run.id);
    const all = view.all!;
    expect(all.cases.map((c) => [c.changePercent, c.objective, c.vendorsAwarded, c.sameAward])).toEqual([
      [-20, 8000, 1, true], [-10, 9000, 1, true], [10, 11_600, 2, false], [20, 12_800, 2, false],
    ]);
    expect(all.cases[2].changes).toEqual([`${firms['B'].name} would be awarded (Depot 1)`]);
    expect([all.stableFrom, all.stableTo]).toEqual([-20, 0]);
    expect(all.summary).toBe('The same vendors win the same regions between −20 % and 0 % (tested at −20 %, −10 %, +10 % and +20 % of all forecasts; nothing in between or beyond was tried). At +10 % the award changes.');
    expect(view.vendorsAwarded).toBe(1);
  });

  test('asking again re-solves nothing (200, queued 0, no new runs); a region that is not the run\'s is 400 naming regionCode and stores nothing', async () => {
    const { tenderId } = await closedTender(1, FIGURES);
    const run = await builtInRun(tenderId, 'split');
    expect((await buyer.post(`/api/runs/${run.id}/sensitivity`, {})).status).toBe(202);
    await sensitivityDone(run.id);
    const again = await compliance.post(`/api/runs/${run.id}/sensitivity`, {});
    expect(again.status).toBe(200);
    expect(again.body).toEqual({ queued: 0 });
    expect(await t.em().count(Run, { parent: run.id })).toBe(4);
    const bad = await buyer.post(`/api/runs/${run.id}/sensitivity`, { regionCode: 'R09' });
    expect(bad.status).toBe(400);
    expect(bad.headers['content-type']).toMatch(/application\/problem\+json/);
    expect(bad.body.errors).toEqual([{ field: 'regionCode', message: "Region R09 is not one of this run's regions." }]);
    expect(await t.em().count(Run, { parent: run.id })).toBe(4);
    expect(await t.em().count(AuditEntry, { tender: tenderId, action: 'run.sensitivity-queued' })).toBe(4);
  });

  test('with an award increment of 500 t the scaled forecasts are rounded to whole lorry loads: R01 1,000 t at −20 % is 1,000 t (800 → 2 × 500), R02 2,000 t at +10 % is 2,000 t', async () => {
    const { tenderId } = await closedTender(2, {
      A: { fixedFee: 100, capacity: null, prices: { R01: 10, R02: 11 } },
    }, { awardBasis: { sourcing: 'split', soleRegions: [], awardIncrement: 500 } });
    const run = await builtInRun(tenderId, 'published');
    expect(run.result!.objective).toBe(100 + 10 * 1000 + 11 * 2000);
    expect((await buyer.post(`/api/runs/${run.id}/sensitivity`, {})).status).toBe(202);
    const view = await sensitivityDone(run.id);
    expect(view.awardIncrement).toBe(500);
    const problems = await t.em().find(Run, { parent: run.id }, { populate: ['problem'], orderBy: { forecastChangePercent: 'asc' } });
    // 1,000 × 0.8 = 800 → 2 loads; 2,000 × 0.8 = 1,600 → 3 loads (1,500); 1,000 × 0.9 = 900 → 2; 2,000 × 0.9 = 1,800 → 4 (2,000);
    // 1,000 × 1.1 = 1,100 → 2; 2,000 × 1.1 = 2,200 → 4; 1,000 × 1.2 = 1,200 → 2; 2,000 × 1.2 = 2,400 → 5 (2,500).
    expect(problems.map((r) => [r.forecastChangePercent, r.problem.regions.map((x) => x.demand)])).toEqual([
      [-20, [1000, 1500]], [-10, [1000, 2000]], [10, [1000, 2000]], [20, [1000, 2500]],
    ]);
    expect(view.all!.cases.map((c) => c.objective)).toEqual([100 + 10_000 + 16_500, 100 + 10_000 + 22_000, 100 + 10_000 + 22_000, 100 + 10_000 + 27_500]);
  });

  describe('on the demo salt tender', () => {
    let demoBuyer: Browser;
    let run: RunView;
    let problem: AwardProblem;

    beforeAll(async () => {
      await seed(t.em(), 'demo');
      demoBuyer = await new Browser(t.app).init();
      expect((await demoBuyer.signIn('buyer@demo.tendara.test', DEMO_PASSWORD)).status).toBe(200);
      const tender = await t.em().findOneOrFail(Tender, { reference: 'NHP-2026-014' });
      const scenarios = (await demoBuyer.get(`/api/tenders/${tender.id}/scenarios`)).body as { id: string; builtIn: string | null }[];
      const queued = await demoBuyer.post(`/api/scenarios/${scenarios.find((s) => s.builtIn === 'published')!.id}/runs`);
      run = await waitForRun(demoBuyer, queued.body.id);
      problem = (await t.em().findOneOrFail(Run, { id: run.id }, { populate: ['problem'] })).problem;
    });

    test('each case of the all-regions check costs what the engine finds on a copy of the run\'s problem with every forecast scaled by the test itself', async () => {
      expect(run.status).toBe('optimal');
      expect((await demoBuyer.post(`/api/runs/${run.id}/sensitivity`, {})).status).toBe(202);
      const view = await waitFor('demo sensitivity', async () => {
        const v = (await demoBuyer.get(`/api/runs/${run.id}/sensitivity`)).body as SensitivityView;
        return v.all && v.all.pending === 0 ? v : null;
      }, { timeoutMs: 200_000, everyMs: 500 });
      expect(view.all!.cases.map((c) => c.changePercent)).toEqual([-20, -10, 10, 20]);
      for (const c of view.all!.cases) {
        // No award increment on this tender: forecasts × (1 + change), to 4 decimals as stored.
        const scaled = { ...problem, regions: problem.regions.map((r) => ({ ...r, demand: Math.round(r.demand * (1 + c.changePercent / 100) * 10_000) / 10_000 })) };
        const independent = await solveAward(scaled);
        expect(c.status).toBe(independent.status);
        expect(c.objective).toBeCloseTo(independent.objective!, 4);
        expect(c.vendorsAwarded).toBe(independent.awards.length);
      }
    });

    test('a region checked alone scales only that region: the other forecasts of each re-solve are the run\'s', async () => {
      const code = problem.regions[2].id;
      const posted = await demoBuyer.post(`/api/runs/${run.id}/sensitivity`, { regionCode: code });
      expect(posted.status).toBe(202);
      expect(posted.body).toEqual({ queued: 4 });
      const view = await waitFor('region sensitivity', async () => {
        const v = (await demoBuyer.get(`/api/runs/${run.id}/sensitivity`)).body as SensitivityView;
        const check = v.regions.find((r) => r.regionCode === code);
        return check && check.pending === 0 ? v : null;
      }, { timeoutMs: 200_000, everyMs: 500 });
      const check = view.regions.find((r) => r.regionCode === code)!;
      expect(check.regionName).toBe(problem.regions[2].name);
      const children = await t.em().find(Run, { parent: run.id, scaledRegion: code }, { populate: ['problem'], orderBy: { forecastChangePercent: 'asc' } });
      expect(children.map((c) => c.forecastChangePercent)).toEqual([-20, -10, 10, 20]);
      for (const child of children) {
        child.problem.regions.forEach((r, i) => {
          const original = problem.regions[i].demand;
          expect(r.demand).toBeCloseTo(i === 2 ? original * (1 + child.forecastChangePercent! / 100) : original, 4);
        });
      }
      expect(check.summary).toContain(`of the forecast of ${problem.regions[2].name} alone`);
    });
  });
});

describe('drop-out check', () => {
  /**
   * Regions 1,000 + 2,000 + 3,000 = 6,000 t. A: fee €1,000, €10/t, cap 3,000 t. B: fee €1,000,
   * €11/t. C: fee €1,000, €9/t (cheapest). Scenario: A required, C excluded → A 3,000 t + B 3,000 t
   * = 2,000 + 30,000 + 33,000 = €65,000. Without B, A's 3,000 t cannot cover 6,000 t with C
   * excluded: no award. A cannot be dropped (required).
   */
  test('a required vendor is shown as required, never re-solved nor the worst case; dropping B keeps the run\'s exclusion of C (no award), even after the scenario was edited to allow C', async () => {
    const { tenderId, firms } = await closedTender(3, {
      A: { fixedFee: 1000, capacity: 3000, prices: { R01: 10, R02: 10, R03: 10 } },
      B: { fixedFee: 1000, capacity: null, prices: { R01: 11, R02: 11, R03: 11 } },
      C: { fixedFee: 1000, capacity: null, prices: { R01: 9, R02: 9, R03: 9 } },
    });
    const created = await buyer.post(`/api/tenders/${tenderId}/scenarios`, { name: 'A required, C out', rules: { require: [firms['A'].orgId], exclude: [firms['C'].orgId] } });
    expect(created.status).toBe(201);
    const queued = await buyer.post(`/api/scenarios/${created.body.id}/runs`);
    const run = await waitForRun(buyer, queued.body.id);
    expect(run.result!.objective).toBe(65_000);
    // The scenario changes after the run: the check is still about the run that was solved.
    const edited = await buyer.send('put', `/api/scenarios/${created.body.id}`, { name: 'A required', rules: { require: [firms['A'].orgId] } });
    expect(edited.status).toBe(200);

    const res = await compliance.post(`/api/runs/${run.id}/resilience`);
    expect(res.status).toBe(202);
    expect(res.body).toEqual({ queued: 1 });
    const view = await resilienceDone(run.id, 2);
    const row = (key: string) => view.rows.find((r) => r.vendor === firms[key].orgId)!;
    expect([row('A').required, row('A').worst, row('A').objective]).toEqual([true, false, null]);
    expect([row('B').required, row('B').status, row('B').worst]).toEqual([false, 'infeasible', true]);
    const child = await t.em().findOneOrFail(Run, { parent: run.id, droppedVendor: firms['B'].orgId }, { populate: ['problem'] });
    expect(child.problem.rules!.exclude!.sort()).toEqual([firms['B'].orgId, firms['C'].orgId].sort());
    expect(child.problem.rules!.require).toEqual([firms['A'].orgId]);
    await drainQueue(t, QUEUES.solve);
    expect(await t.em().count(Run, { parent: run.id, droppedVendor: firms['A'].orgId })).toBe(0);
  });
});

describe('plain words in the award workbook', () => {
  test('the Award sheet states the status in the buyer\'s words; bound, gap, bound source and engine are on the "Engine details" sheet only', async () => {
    const { tenderId } = await closedTender(1, { A: { fixedFee: 0, capacity: null, prices: { R01: 10 } } });
    const run = await builtInRun(tenderId, 'split');
    const res = await buyer.get(`/api/runs/${run.id}/export.xlsx`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(res.status).toBe(200);
    const wb = await XlsxPopulate.fromDataAsync(res.body as Buffer);
    const text = (name: string) => (wb.sheet(name)!.usedRange()!.value() as unknown[][]).flat().filter((v) => v !== undefined && v !== null).map(String).join('\n');
    expect(wb.sheets().map((sh) => sh.name())).toEqual(['Award', 'Allocation', 'Engine details']);
    const award = text('Award');
    expect(award).toContain('Status: Best possible award (proven).');
    for (const word of ['Best bound', 'Relative gap', 'Bound from', run.result!.engine]) expect(award).not.toContain(word);
    const engine = text('Engine details');
    expect(engine).toContain('Best bound (lower limit on the best possible total)');
    expect(engine).toContain('Relative gap');
    expect(engine).toContain(run.result!.engine);
    expect(wb.sheet('Engine details')!.cell('B5').value()).toBe(run.result!.bound);
  });
});
