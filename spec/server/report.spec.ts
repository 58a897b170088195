import XlsxPopulate from 'xlsx-populate';
import type { AuditEntryView, RunView } from '@shared/evaluation';
import type { User } from '../../server/entities';
import { REPORT_LAYOUT } from '../../server/workbooks/report-workbook';
import { type Browser, makeUser, signedIn, startTestApp, type TestApp } from '../support/app';
import { waitForRun } from '../support/evaluation';
import { embeddedFonts, pdfText } from '../support/pdf-text';
import { openTender, passClosingTime, tenderBody } from '../support/tenders';
import { waitFor } from '../support/wait';

/**
 * The evaluation report of a tender, as a PDF and as a workbook: read back (the PDF's text by
 * pdfjs-dist, the workbook by xlsx-populate) and checked against the run it reports
 * (`GET /api/runs/:id`) and the audit trail (`GET /api/tenders/:id/audit`); Noto Sans embedded;
 * refused while the bids are sealed.
 */
jest.setTimeout(180_000);
let t: TestApp;
let buyer: Browser;
let compliance: Browser;

/**
 * Forecasts R01 1,000 t, R02 2,000 t, R03 3,000 t. A is cheapest in R01, B in R02 and R03; C is
 * excluded (qualification). The split award: A 1,000 t of R01 at 18 (18,000 + fee 100), B 5,000 t
 * at 18 (90,000 + fee 100) = 108,200.
 */
const FIGURES = {
  A: { fixedFee: 100, prices: { R01: 18, R02: 20, R03: 20 } },
  B: { fixedFee: 100, prices: { R01: 20, R02: 18, R03: 18 } },
  C: { fixedFee: 100, prices: { R01: 21, R02: 21, R03: 21 } },
};
type Key = keyof typeof FIGURES;
const names = {} as Record<Key, string>;
let tenderId: string;
let reference: string;
let sealedId: string;
let run: RunView;

function binary(res: import('superagent').Request) {
  return res.buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = [];
    r.on('data', (c: Buffer) => chunks.push(c));
    r.on('end', () => cb(null, Buffer.concat(chunks)));
  });
}

let org: Record<Key, string>;
let vendors: Record<Key, Browser>;

/**
 * A tender of its own with the three bids: closed, A and B compliant, C excluded, the published
 * basis solved; with `checks`, the drop-out, explanation and forecast checks computed before the
 * recommendation (an awarded tender's runs are frozen); then recommended and approved.
 */
async function approvedTender(checks: (runId: string) => Promise<void>): Promise<{ tenderId: string; reference: string; run: RunView }> {
  const body = tenderBody(3);
  const id = await openTender(buyer, Object.values(org), body);
  const bidIds = {} as Record<Key, string>;
  for (const key of Object.keys(FIGURES) as Key[]) {
    const saved = await vendors[key].send('put', `/api/tenders/${id}/bid`, { ...FIGURES[key], capacity: null, submit: true, version: null });
    expect(saved.status).toBe(200);
    bidIds[key] = saved.body.id;
  }
  await passClosingTime(t, id);
  expect((await buyer.get(`/api/tenders/${id}/bids`)).status).toBe(200);
  for (const key of ['A', 'B'] as const) {
    expect((await buyer.send('put', `/api/tenders/${id}/bids/${bidIds[key]}/compliance`, { decision: 'compliant', note: 'Complete and qualified.' })).status).toBe(200);
  }
  const excluded = await buyer.send('put', `/api/tenders/${id}/bids/${bidIds.C}/compliance`, { decision: 'excluded', ground: 'qualification', note: 'No winter service record.' });
  expect(excluded.status).toBe(200);
  const scenarios = await buyer.get(`/api/tenders/${id}/scenarios`);
  const basis = scenarios.body.find((s: { builtIn: string | null }) => s.builtIn === 'published');
  const solved = await waitForRun(buyer, (await buyer.post(`/api/scenarios/${basis.id}/runs`)).body.id);
  await checks(solved.id);
  expect((await buyer.post(`/api/tenders/${id}/recommendation`, { runId: solved.id, justification: 'Least total cost under the published basis.' })).status).toBe(201);
  expect((await compliance.post(`/api/tenders/${id}/recommendation/approve`, { comment: 'Checked against the tabulation.' })).status).toBe(200);
  return { tenderId: id, reference: body.reference, run: solved };
}

beforeAll(async () => {
  t = await startTestApp();
  buyer = await signedIn(t, await makeUser(t, 'buyer'));
  compliance = await signedIn(t, await makeUser(t, 'compliance'));
  org = {} as Record<Key, string>;
  vendors = {} as Record<Key, Browser>;
  for (const key of Object.keys(FIGURES) as Key[]) {
    const user: User = await makeUser(t, 'vendor');
    org[key] = user.vendorOrganisation!.id;
    names[key] = user.vendorOrganisation!.name;
    vendors[key] = await signedIn(t, user);
  }
  sealedId = await openTender(buyer, [org.A], tenderBody(2));
  ({ tenderId, reference, run } = await approvedTender(async () => {}));
});
afterAll(() => t.close());

/** The run as the API serves it, with the figures the report must repeat. */
async function servedRun(): Promise<RunView> {
  const res = await buyer.get(`/api/runs/${run.id}`);
  expect(res.status).toBe(200);
  return res.body as RunView;
}

/** Table cells may wrap (a long vendor name at a hyphen): rows are compared without white space. */
const squeezed = (s: string) => s.replace(/\s+/g, '');

async function auditHead(): Promise<{ hash: string; entries: number }> {
  const trail = (await buyer.get(`/api/tenders/${tenderId}/audit`)).body as AuditEntryView[];
  return { hash: trail.at(-1)!.hash, entries: trail.length };
}

describe('the evaluation report as a PDF', () => {
  let text: string;
  let flat: string;
  let pdf: Buffer;
  beforeAll(async () => {
    const res = await binary(buyer.get(`/api/tenders/${tenderId}/report.pdf`));
    expect({ status: res.status, type: res.type, disposition: res.headers['content-disposition'] }).toEqual({
      status: 200, type: 'application/pdf', disposition: `attachment; filename=${reference}-evaluation-report.pdf`,
    });
    pdf = res.body as Buffer;
    text = (await pdfText(pdf)).text.replace(/\s+/g, ' ');
    flat = text.replace(/\s+/g, '');
  });

  test('states the run’s total cost, and each allocated line (region, vendor, quantity, unit price, line value) as the run awards it', async () => {
    const served = await servedRun();
    expect({ objective: served.result!.objective, fixed: served.result!.fixedCost, variable: served.result!.variableCost }).toEqual({ objective: 108_200, fixed: 200, variable: 108_000 });
    expect(text).toContain('Total cost at the forecast €108,200.00');
    expect(text).toContain('Fixed fees €200.00');
    const lines = served.result!.awards.flatMap((a) => a.lines.filter((l) => l.quantity > 0).map((l) => ({ vendor: served.vendors[a.vendor].name, ...l })));
    expect(lines.map((l) => `${l.region} ${l.vendor} ${l.quantity} ${l.unitPrice} ${l.cost}`).sort()).toEqual([
      `R01 ${names.A} 1000 18 18000`, `R02 ${names.B} 2000 18 36000`, `R03 ${names.B} 3000 18 54000`,
    ]);
    expect(flat).toContain(squeezed(`Depot 1 (R01) ${names.A} 1,000 t €18.00 €18,000.00`));
    expect(flat).toContain(squeezed(`Depot 2 (R02) ${names.B} 2,000 t €18.00 €36,000.00`));
    expect(flat).toContain(squeezed(`Depot 3 (R03) ${names.B} 3,000 t €18.00 €54,000.00`));
  });

  test('states the tabulation (totals at the forecast), the exclusion with its ground, the approval with its comment, and the checks not run', () => {
    expect(text).toContain('Bids received: 3. Compliant: 2. Excluded: 1. Not checked: 0.');
    // Fee 100 + prices × forecasts 1,000 / 2,000 / 3,000 t.
    expect(flat).toContain(squeezed(`${names.A} €100.00 3 of 3 €118,100.00 Compliant`));
    expect(flat).toContain(squeezed(`${names.B} €100.00 3 of 3 €110,100.00 Compliant`));
    expect(flat).toContain(squeezed(`${names.C} €100.00 3 of 3 €126,100.00 Excluded: Fails the qualification criteria (No winter service record.)`));
    expect(text).toContain('Round 1: Approved.');
    expect(text).toContain('“Checked against the tabulation.”');
    expect(text).toContain('If an awarded vendor dropped out Not run.');
    expect(text).toContain('If the forecast changed Not run.');
    expect(text).toContain('Decision support only');
  });

  test('carries the audit chain’s head hash and entry count as GET /audit serves them, and that the chain verifies', async () => {
    const head = await auditHead();
    expect(head.hash).toMatch(/^[0-9a-f]{64}$/);
    // The hash may wrap across lines in its column: compared without white space.
    expect(flat).toContain(`Headhash(SHA-256)${head.hash}`);
    expect(text).toContain(`Entries ${head.entries}`);
    expect(text).toContain(`Verified: All ${head.entries} entries verify`);
  });

  test('embeds Noto Sans (regular and bold) as font programs, and no other font', () => {
    expect(embeddedFonts(pdf)).toEqual({ names: ['NotoSans-Bold', 'NotoSans-Regular'], programs: 2 });
  });
});

describe('the evaluation report as a workbook', () => {
  test('holds the same total, the tabulation’s totals at the forecast, the allocation and the audit head hash', async () => {
    const res = await binary(compliance.get(`/api/tenders/${tenderId}/report.xlsx`));
    expect({ status: res.status, disposition: res.headers['content-disposition'] }).toEqual({
      status: 200, disposition: `attachment; filename=${reference}-evaluation-report.xlsx`,
    });
    const book = await XlsxPopulate.fromDataAsync(res.body as Buffer);
    const summary = book.sheet(REPORT_LAYOUT.summary)!;
    const valueOf = (label: string) => {
      for (let row = 1; row < 200; row++) if (summary.cell(row, 1).value() === label) return summary.cell(row, 2).value();
      return undefined;
    };
    const served = await servedRun();
    const head = await auditHead();
    expect({ total: valueOf(REPORT_LAYOUT.total), hash: valueOf(REPORT_LAYOUT.headHash), entries: valueOf(REPORT_LAYOUT.entries) }).toEqual({
      total: served.result!.objective, hash: head.hash, entries: head.entries,
    });
    const bids = book.sheet(REPORT_LAYOUT.bids)!;
    expect([2, 3, 4].map((row) => [bids.cell(row, 1).value(), bids.cell(row, 6).value()]).sort()).toEqual(
      [[names.A, 118_100], [names.B, 110_100], [names.C, 126_100]].sort(),
    );
    const award = book.sheet(REPORT_LAYOUT.award)!;
    expect([2, 3, 4].map((row) => [2, 3, 4, 5, 6].map((col) => award.cell(row, col).value()))).toEqual([
      ['R01', names.A, 1000, 18, 18_000], ['R02', names.B, 2000, 18, 36_000], ['R03', names.B, 3000, 18, 54_000],
    ]);
  });
});

describe('with the explanation, drop-out and forecast checks computed', () => {
  test('the PDF states why each region went where it did, the cost of losing each awarded vendor, and no check as not run', async () => {
    const checked = await approvedTender(async (runId) => {
      expect((await buyer.post(`/api/runs/${runId}/resilience`)).status).toBe(202);
      expect((await buyer.post(`/api/runs/${runId}/explanation`)).status).toBe(202);
      expect((await buyer.post(`/api/runs/${runId}/sensitivity`, {})).status).toBe(202);
      await waitFor('the drop-out re-solves', async () => {
        const rows = (await buyer.get(`/api/runs/${runId}/resilience`)).body.rows as { status: string }[];
        return rows.length === 2 && rows.every((r) => !['queued', 'solving'].includes(r.status));
      }, { timeoutMs: 150_000 });
      await waitFor('the explanation', async () => (await buyer.get(`/api/runs/${runId}/explanation`)).body.status === 'done', { timeoutMs: 150_000 });
      await waitFor('the forecast check', async () => (await buyer.get(`/api/runs/${runId}/sensitivity`)).body.all?.pending === 0, { timeoutMs: 150_000 });
    });
    const res = await binary(buyer.get(`/api/tenders/${checked.tenderId}/report.pdf`));
    const text = (await pdfText(res.body as Buffer)).text.replace(/\s+/g, ' ');
    const flat = squeezed(text);
    // Without A, B takes all: 100 + 20 × 1,000 + 18 × 5,000 = 110,100, 1,900 more (1.8 % of 108,200).
    // Without B, A takes all (C is excluded): 100 + 18 × 1,000 + 20 × 5,000 = 118,100, 9,900 more (9.1 %).
    expect(flat).toContain(squeezed(`${names.A}: Without it, the award would cost €1,900.00 more (1.8 %).`));
    expect(flat).toContain(squeezed(`${names.B}: Without it, the award would cost €9,900.00 more (9.1 %). The worst case.`));
    // R01 went to A; B (20 a tonne) is the cheapest bid that got none of it.
    expect(flat).toContain(squeezed(`Depot 1 (R01): Awarded to ${names.A}. ${names.B} (unit price €20.00) got none of it:`));
    expect(text).not.toContain('Not run.');
  });
});

describe('before closing', () => {
  test.each(['report.pdf', 'report.xlsx'])('%s of a tender still open answers 409 problem+json and reveals nothing', async (file) => {
    const res = await buyer.get(`/api/tenders/${sealedId}/${file}`);
    expect({ status: res.status, type: res.type }).toEqual({ status: 409, type: 'application/problem+json' });
  });
});
