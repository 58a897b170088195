import XlsxPopulate from 'xlsx-populate';
import { simpleParser } from 'mailparser';
import type { OpeningRecordView } from '@shared/compliance';
import type { TabulatedBid } from '@shared/tenders';
import { formatInZone } from '@shared/time-zone';
import { AuditEntry, Bid, MailMessage, OpeningRecord, Tender, type User } from '../../server/entities';
import { digestOf } from '../../server/services/audit.service';
import { OPENING_RECORD_LAYOUT } from '../../server/workbooks/opening-record-workbook';
import { Browser, makeUser, signedIn, startTestApp, waitForMail, type TestApp } from '../support/app';
import { waitForRun } from '../support/evaluation';
import { openTender, passClosingTime, tenderBody } from '../support/tenders';
import { waitFor } from '../support/wait';

/**
 * Issue 13, points 5 to 8: the opening record, the compliance check, abnormally low prices and the
 * bids' validity, through the API on real PostgreSQL, the real engine and the real mail catcher.
 */
jest.setTimeout(180_000);
const DAY = 86_400_000;

let t: TestApp;
let buyer: Browser;
let compliance: Browser;

/**
 * Four bids on R01 (1,000 t), R02 (2,000 t), R03 (3,000 t), no caps, fee 1,000 each:
 * A 50/50/50, B 52/52/52, C 30/51/51, D 54/54/54. R01's median is (50 + 52) / 2 = 51, so C's 30 is
 * below the threshold 40.8 (20 %). The least-cost split award is A (R02, R03) and C (R01):
 * 2,000 + 30 × 1,000 + 50 × 5,000 = 282,000, below C alone (286,000) and A alone (301,000).
 */
const FIGURES: Record<string, { fixedFee: number; prices: Record<string, number> }> = {
  A: { fixedFee: 1000, prices: { R01: 50, R02: 50, R03: 50 } },
  B: { fixedFee: 1000, prices: { R01: 52, R02: 52, R03: 52 } },
  C: { fixedFee: 1000, prices: { R01: 30, R02: 51, R03: 51 } },
  D: { fixedFee: 1000, prices: { R01: 54, R02: 54, R03: 54 } },
};

interface Closed {
  tenderId: string;
  vendors: Record<string, { user: User; browser: Browser; orgId: string; name: string }>;
  bids: Record<string, TabulatedBid>;
}

/** A closed tender with the four bids above (and, with `withdrawn`, a fifth vendor that bid and withdrew). */
async function closedTender(options: { withdrawn?: boolean } = {}): Promise<Closed> {
  const vendors: Closed['vendors'] = {};
  const keys = [...Object.keys(FIGURES), ...(options.withdrawn ? ['W'] : [])];
  for (const key of keys) {
    const user = await makeUser(t, 'vendor');
    vendors[key] = { user, browser: await signedIn(t, user), orgId: user.vendorOrganisation!.id, name: user.vendorOrganisation!.name };
  }
  const tenderId = await openTender(buyer, keys.map((k) => vendors[k].orgId), tenderBody(3));
  for (const key of keys) {
    const figures = FIGURES[key] ?? FIGURES['A'];
    const saved = await vendors[key].browser.send('put', `/api/tenders/${tenderId}/bid`, { ...figures, capacity: null, submit: true, version: null });
    expect(saved.status).toBe(200);
    if (key === 'W') expect((await vendors[key].browser.post(`/api/tenders/${tenderId}/bid/withdraw`, { version: saved.body.version })).status).toBe(200);
  }
  await passClosingTime(t, tenderId);
  const tab = await buyer.get(`/api/tenders/${tenderId}/bids`);
  expect(tab.status).toBe(200);
  const bids: Closed['bids'] = {};
  for (const key of Object.keys(FIGURES)) bids[key] = (tab.body.bids as TabulatedBid[]).find((b) => b.vendor.id === vendors[key].orgId)!;
  return { tenderId, vendors, bids };
}

async function splitRun(tenderId: string) {
  const scenarios = await buyer.get(`/api/tenders/${tenderId}/scenarios`);
  const split = scenarios.body.find((s: { builtIn: string | null }) => s.builtIn === 'split');
  const queued = await buyer.post(`/api/scenarios/${split.id}/runs`);
  expect([200, 202]).toContain(queued.status);
  return waitForRun(buyer, queued.body.id);
}

const actions = async (tenderId: string) => (await t.em().find(AuditEntry, { tender: tenderId }, { orderBy: { seq: 'asc' } })).map((e) => e.action);

beforeAll(async () => {
  t = await startTestApp();
  buyer = await signedIn(t, await makeUser(t, 'buyer'));
  compliance = await signedIn(t, await makeUser(t, 'compliance'));
});
afterAll(() => t.close());

test('the opening record lists every bid received and withdrawn; the SHA-256 recomputed from its JSON is the one in the tender.closed audit entry, and the workbook lists the same', async () => {
  const { tenderId, vendors } = await closedTender({ withdrawn: true });
  const res = await compliance.get(`/api/tenders/${tenderId}/opening-record`);
  expect(res.status).toBe(200);
  const view = res.body as OpeningRecordView;
  expect(view.record.bids.map((b) => b.vendor.name).sort()).toEqual(['A', 'B', 'C', 'D'].map((k) => vendors[k].name).sort());
  const stored = await t.em().find(Bid, { tender: tenderId, status: 'submitted' }, { populate: ['vendorOrganisation'] });
  for (const b of view.record.bids) {
    const bid = stored.find((s) => s.vendorOrganisation.id === b.vendor.id)!;
    expect(b).toEqual({ vendor: { id: bid.vendorOrganisation.id, name: bid.vendorOrganisation.name }, receivedAt: bid.submittedAt!.toISOString(), revision: 1, digest: bid.digest });
  }
  const withdrawnBid = await t.em().findOneOrFail(Bid, { tender: tenderId, vendorOrganisation: vendors['W'].orgId });
  expect(view.record.withdrawn).toEqual([{ vendor: { id: vendors['W'].orgId, name: vendors['W'].name }, withdrawnAt: withdrawnBid.updatedAt.toISOString() }]);
  // Anyone can recompute the digest from the JSON served, and find it in the audit trail.
  expect(digestOf(view.record)).toBe(view.digest);
  const trail = await buyer.get(`/api/tenders/${tenderId}/audit`);
  const closed = (trail.body as { action: string; detail: Record<string, unknown> }[]).find((e) => e.action === 'tender.closed')!;
  expect(closed.detail).toEqual({
    submittedBids: 4, openingRecordDigest: view.digest,
    // The first screen at opening: C's R01 price (30 below 40.8).
    abnormallyLow: [{ vendor: vendors['C'].orgId, regions: ['R01'], total: false }],
  });
  expect((await buyer.get(`/api/tenders/${tenderId}/audit/verify`)).body.ok).toBe(true);

  const file = await buyer.get(`/api/tenders/${tenderId}/opening-record.xlsx`).buffer(true).parse((r, cb) => {
    const chunks: Buffer[] = [];
    r.on('data', (c: Buffer) => chunks.push(c));
    r.on('end', () => cb(null, Buffer.concat(chunks)));
  });
  expect(file.status).toBe(200);
  expect(file.headers['content-disposition']).toMatch(/opening-record\.xlsx/);
  const sheet = (await XlsxPopulate.fromDataAsync(file.body as Buffer)).sheet(OPENING_RECORD_LAYOUT.sheet)!;
  const rows = view.record.bids.map((_, i) => [1, 2, 3, 4].map((c) => sheet.cell(OPENING_RECORD_LAYOUT.firstBidRow + i, c).value()));
  // Times in the one date-time format, in the tender's zone (named in the heading).
  const when = (iso: string) => formatInZone(iso, 'UTC', { named: false, seconds: true });
  expect(rows).toEqual(view.record.bids.map((b) => [b.vendor.name, when(b.receivedAt), b.revision, b.digest]));
  expect(sheet.cell(OPENING_RECORD_LAYOUT.digest).value()).toContain(view.digest);
  const afterBids = OPENING_RECORD_LAYOUT.firstBidRow + view.record.bids.length + 2;
  expect([sheet.cell(afterBids, 1).value(), sheet.cell(afterBids, 2).value()]).toEqual([vendors['W'].name, when(view.record.withdrawn[0].withdrawnAt)]);
});

test('no opening record before closing, and none for a tender closed before records were kept: 404 saying which', async () => {
  const firm = await makeUser(t, 'vendor');
  const open = await openTender(buyer, [firm.vendorOrganisation!.id]);
  const before = await buyer.get(`/api/tenders/${open}/opening-record`);
  expect({ status: before.status, detail: before.body.detail }).toEqual({ status: 404, detail: 'The opening record is made when the tender closes; this tender has not closed yet.' });
  await passClosingTime(t, open);
  expect((await buyer.get(`/api/tenders/${open}`)).body.status).toBe('closed');
  expect((await buyer.get(`/api/tenders/${open}/opening-record`)).status).toBe(200);
  // As if closed before this change: no record row.
  await t.em().nativeDelete(OpeningRecord, { tender: open });
  const absent = await compliance.get(`/api/tenders/${open}/opening-record`);
  expect({ status: absent.status, detail: absent.body.detail }).toEqual({
    status: 404, detail: 'This tender was closed before opening records were kept: it has none. Its audit trail lists every bid received and withdrawn.',
  });
});

test('an exclusion without a ground or a note is refused naming the field, and nothing is stored; a compliance check on an open tender is 409', async () => {
  const { tenderId, bids } = await closedTender();
  const path = `/api/tenders/${tenderId}/bids/${bids['D'].id}/compliance`;
  const noGround = await buyer.send('put', path, { decision: 'excluded', note: 'No insurance certificate.' });
  expect({ status: noGround.status, type: noGround.type, errors: noGround.body.errors }).toEqual({
    status: 400, type: 'application/problem+json', errors: [{ field: 'ground', message: 'An exclusion needs a ground from the list.' }],
  });
  const noNote = await buyer.send('put', path, { decision: 'excluded', ground: 'qualification', note: '  ' });
  expect(noNote.body.errors).toEqual([{ field: 'note', message: 'Note is required.' }]);
  const badGround = await buyer.send('put', path, { decision: 'excluded', ground: 'too-expensive', note: 'x' });
  expect(badGround.body.errors.map((e: { field: string }) => e.field)).toEqual(['ground']);
  const stored = await t.em().findOneOrFail(Bid, { id: bids['D'].id });
  expect({ decision: stored.complianceDecision, ground: stored.complianceGround, note: stored.complianceNote }).toEqual({ decision: null, ground: null, note: null });
  expect((await actions(tenderId)).filter((a) => a.startsWith('bid.excluded') || a.startsWith('bid.compliant'))).toEqual([]);

  const firm = await makeUser(t, 'vendor');
  const open = await openTender(buyer, [firm.vendorOrganisation!.id]);
  const early = await buyer.send('put', `/api/tenders/${open}/bids/${bids['D'].id}/compliance`, { decision: 'compliant', note: 'Complete.' });
  expect(early.status).toBe(409);
});

test('an excluded bid is out of every scenario: new runs solve without it, a scenario requiring it gets 409 naming it, one excluding it is accepted, and a run solved before the exclusion cannot be recommended', async () => {
  const { tenderId, bids, vendors } = await closedTender();
  const before = await splitRun(tenderId);
  expect(before.status).toBe('optimal');
  for (const key of ['A', 'B', 'C']) {
    expect((await buyer.send('put', `/api/tenders/${tenderId}/bids/${bids[key].id}/compliance`, { decision: 'compliant', note: 'Complete and qualified.' })).status).toBe(200);
  }
  const excluded = await buyer.send('put', `/api/tenders/${tenderId}/bids/${bids['D'].id}/compliance`, { decision: 'excluded', ground: 'qualification', note: 'No proof of the required road haulage licence.' });
  expect(excluded.status).toBe(200);
  expect(excluded.body.compliance).toEqual({ decision: 'excluded', ground: 'qualification', note: 'No proof of the required road haulage licence.', decidedAt: expect.any(String) });

  // Compliance sees the grounds.
  const seen = (await compliance.get(`/api/tenders/${tenderId}/bids`)).body.bids as TabulatedBid[];
  expect(seen.find((b) => b.id === bids['D'].id)!.compliance).toMatchObject({ decision: 'excluded', ground: 'qualification' });
  expect(seen.filter((b) => b.compliance.decision === 'compliant').map((b) => b.id).sort()).toEqual([bids['A'].id, bids['B'].id, bids['C'].id].sort());

  const stale = await buyer.post(`/api/tenders/${tenderId}/recommendation`, { runId: before.id, justification: 'Least cost.' });
  expect(stale.status).toBe(409);
  expect(stale.body.detail).toBe(`This run was solved before the bid of ${vendors['D'].name} was excluded: run the scenario again and recommend the new run.`);

  const after = await splitRun(tenderId);
  expect(after.id).not.toBe(before.id);
  const problem = await t.em().getConnection().execute<{ ids: string[] }[]>(`select array(select v->>'id' from jsonb_array_elements(problem->'vendors') v) as ids from run where id = ?`, [after.id]);
  expect(problem[0].ids.sort()).toEqual(['A', 'B', 'C'].map((k) => vendors[k].orgId).sort());

  const requiring = await buyer.post(`/api/tenders/${tenderId}/scenarios`, { name: 'Needs D', rules: { sourcing: 'split', require: [vendors['D'].orgId] } });
  expect(requiring.status).toBe(409);
  expect(requiring.body.errors).toEqual([{ field: 'rules.require[0]', message: `${vendors['D'].name} is excluded by the compliance check (Fails the qualification criteria) and cannot be required.` }]);
  const excluding = await buyer.post(`/api/tenders/${tenderId}/scenarios`, { name: 'Without D', rules: { sourcing: 'split', exclude: [vendors['D'].orgId] } });
  expect(excluding.status).toBe(201);
  const run = await waitForRun(buyer, (await buyer.post(`/api/scenarios/${excluding.body.id}/runs`)).body.id);
  expect({ status: run.status, objective: run.result!.objective }).toEqual({ status: 'optimal', objective: 282000 });
  expect(await actions(tenderId)).toEqual(expect.arrayContaining(['bid.compliant', 'bid.excluded']));
});

test('a run awarding a flagged price is recommended only after the buyer records the accepted explanation (409 naming vendor and region before); flags and decision are re-computable and audited', async () => {
  const { tenderId, bids, vendors } = await closedTender();
  expect(bids['C'].flags).toEqual({ percent: 20, prices: [{ region: 'R01', price: 30, median: 51, threshold: 40.8 }], total: null, totalCompared: true });
  expect(bids['A'].flags.prices).toEqual([]);
  const run = await splitRun(tenderId);
  expect(run.result!.objective).toBe(282000);
  expect(run.result!.awards.map((a) => a.vendor).sort()).toEqual([vendors['A'].orgId, vendors['C'].orgId].sort());
  const refused = await buyer.post(`/api/tenders/${tenderId}/recommendation`, { runId: run.id, justification: 'Least cost.' });
  expect(refused.status).toBe(409);
  expect(refused.body.detail).toBe(`This run awards abnormally low prices not yet cleared. ${vendors['C'].name}: its unit price in region R01 is flagged as abnormally low; record that an explanation was asked for and whether it was accepted, or exclude the bid.`);

  const path = `/api/tenders/${tenderId}/bids/${bids['C'].id}/abnormally-low`;
  const noNote = await buyer.send('put', path, { accepted: true });
  expect(noNote.body.errors).toEqual([{ field: 'note', message: 'Note is required.' }]);
  const future = await buyer.send('put', path, { accepted: true, note: 'x', explanationRequestedAt: new Date(Date.now() + DAY).toISOString() });
  expect(future.body.errors.map((e: { field: string }) => e.field)).toEqual(['explanationRequestedAt']);
  expect((await buyer.send('put', `/api/tenders/${tenderId}/bids/${bids['A'].id}/abnormally-low`, { accepted: true, note: 'x' })).status).toBe(409);
  expect((await t.em().findOneOrFail(Bid, { id: bids['C'].id })).lowPriceDecidedAt).toBeNull();

  // A moment ago: after the closing time (about half a minute before the tender closed) and not in the future.
  const askedAt = new Date(Date.now() - 2_000).toISOString();
  const notAccepted = await buyer.send('put', path, { explanationRequestedAt: askedAt, accepted: false, note: 'No evidence of the quarry contract offered.' });
  expect(notAccepted.status).toBe(200);
  const still = await buyer.post(`/api/tenders/${tenderId}/recommendation`, { runId: run.id, justification: 'Least cost.' });
  expect(still.body.detail).toContain('its explanation was not accepted: exclude the bid on the ground abnormally-low');
  const accepted = await buyer.send('put', path, { explanationRequestedAt: askedAt, accepted: true, note: 'Own quarry 4 km from depot 1; haulage cost shown.' });
  expect(accepted.body.abnormallyLow).toEqual({ explanationRequestedAt: askedAt, accepted: true, note: 'Own quarry 4 km from depot 1; haulage cost shown.', decidedAt: expect.any(String) });
  expect((await buyer.post(`/api/tenders/${tenderId}/recommendation`, { runId: run.id, justification: 'Least cost.' })).status).toBe(201);
  const entry = await t.em().findOneOrFail(AuditEntry, { tender: tenderId, action: 'bid.abnormally-low-accepted' });
  expect(entry.detail).toEqual({
    vendor: vendors['C'].name, explanationRequestedAt: askedAt, accepted: true, note: 'Own quarry 4 km from depot 1; haulage cost shown.',
    flags: { percent: 20, regions: [{ region: 'R01', price: 30, median: 51 }], total: null },
  });
  // While the recommendation awaits compliance, the checks are frozen.
  expect((await buyer.send('put', `/api/tenders/${tenderId}/bids/${bids['B'].id}/compliance`, { decision: 'compliant', note: 'ok' })).status).toBe(409);
});

test("after the bids' validity has ended, approval is refused until each awarded vendor confirms an extension in the portal; the excluded vendor gets an exclusion notice, not a regret letter", async () => {
  const { tenderId, bids, vendors } = await closedTender();
  expect((await buyer.send('put', `/api/tenders/${tenderId}/bids/${bids['D'].id}/compliance`, { decision: 'excluded', ground: 'conflict-of-interest', note: 'A director also sits on the evaluation panel.' })).status).toBe(200);
  expect((await buyer.send('put', `/api/tenders/${tenderId}/bids/${bids['C'].id}/abnormally-low`, { accepted: true, note: 'Own quarry near depot 1.' })).status).toBe(200);
  const run = await splitRun(tenderId);
  expect((await buyer.post(`/api/tenders/${tenderId}/recommendation`, { runId: run.id, justification: 'Least cost.' })).status).toBe(201);
  // Time moves by storing an older closing time: 91 days ago, validity 90 days → ended yesterday.
  const closesAt = new Date(Date.now() - 91 * DAY);
  await t.em().nativeUpdate(Tender, { id: tenderId }, { closesAt });
  const ended = formatInZone(new Date(closesAt.getTime() + 90 * DAY), 'UTC');
  const [first, second] = [vendors['A'], vendors['C']].sort((x, y) => (run.result!.awards.findIndex((a) => a.vendor === x.orgId) - run.result!.awards.findIndex((a) => a.vendor === y.orgId)));
  const refused = await compliance.post(`/api/tenders/${tenderId}/recommendation/approve`, { comment: 'Checked.' });
  expect({ status: refused.status, detail: refused.body.detail }).toEqual({
    status: 409, detail: `The bids' validity ended on ${ended}; each awarded vendor must confirm an extension before the award can be approved. Not yet confirmed: ${first.name}, ${second.name}.`,
  });
  expect((await t.em().findOneOrFail(Tender, { id: tenderId })).status).toBe('closed');

  const own = await first.browser.get(`/api/tenders/${tenderId}/bid`);
  expect(own.body.bid.validity).toEqual({ validUntil: new Date(closesAt.getTime() + 90 * DAY).toISOString(), extendedUntil: null });
  const past = await first.browser.post(`/api/tenders/${tenderId}/bid/validity-extension`, { until: new Date(Date.now() - DAY).toISOString() });
  expect(past.body.errors.map((e: { field: string }) => e.field)).toEqual(['until']);
  expect((await t.em().findOneOrFail(Bid, { tender: tenderId, vendorOrganisation: first.orgId })).validityExtendedUntil).toBeNull();
  const extended = await first.browser.post(`/api/tenders/${tenderId}/bid/validity-extension`, {});
  expect(extended.status).toBe(200);
  expect(new Date(extended.body.extendedUntil).getTime()).toBeGreaterThan(Date.now() + 89 * DAY);
  const half = await compliance.post(`/api/tenders/${tenderId}/recommendation/approve`, { comment: 'Checked.' });
  expect(half.body.detail).toMatch(new RegExp(`Not yet confirmed: ${second.name}\\.$`));
  expect((await second.browser.post(`/api/tenders/${tenderId}/bid/validity-extension`, { until: new Date(Date.now() + 30 * DAY).toISOString() })).status).toBe(200);
  expect((await compliance.post(`/api/tenders/${tenderId}/recommendation/approve`, { comment: 'Checked.' })).status).toBe(200);
  expect(await actions(tenderId)).toEqual(expect.arrayContaining(['bid.validity-extended', 'recommendation.approved']));
  expect((await t.em().find(AuditEntry, { tender: tenderId, action: 'bid.validity-extended' })).map((e) => e.detail['vendor']).sort()).toEqual([first.name, second.name].sort());

  // Notices: award letters to A and C, a regret letter to B (naming A and C as successful, no rank), an exclusion notice to D.
  const preview = await buyer.get(`/api/tenders/${tenderId}/notices/preview`);
  expect((preview.body as { vendor: { id: string }; kind: string }[]).map((l) => [l.vendor.id, l.kind]).sort()).toEqual([
    [vendors['A'].orgId, 'award'], [vendors['B'].orgId, 'regret'], [vendors['C'].orgId, 'award'], [vendors['D'].orgId, 'exclusion'],
  ].sort());
  expect((await buyer.post(`/api/tenders/${tenderId}/notices`)).status).toBe(202);
  const mail = await waitForMail(t, vendors['D'].user.vendorOrganisation!.contactEmail, 'Exclusion of your bid');
  const parsed = await simpleParser((await t.em().findOneOrFail(MailMessage, { id: mail.id }, { populate: ['raw'] })).raw);
  expect(parsed.subject).toBe(`Exclusion of your bid: ${(await t.em().findOneOrFail(Tender, { id: tenderId })).reference}`);
  expect(parsed.text).toContain('Ground: Conflict of interest');
  expect(parsed.text).toContain("The buyer's reasons: A director also sits on the evaluation panel.");
  expect(parsed.text).toContain("follow the\nbuyer's procurement rules and the law that applies to this tender");
  expect(parsed.html).toContain('<strong>Conflict of interest</strong>');
  const regret = await waitForMail(t, vendors['B'].user.vendorOrganisation!.contactEmail, 'Outcome of tender');
  expect(regret.text).toContain(`Successful vendors: ${[vendors['A'].name, vendors['C'].name].sort((x, y) => x.localeCompare(y)).join(' and ')}.`);
  expect(regret.text).not.toMatch(/rank/i);
  await waitFor('every notice sent', async () => (await t.em().findOneOrFail(Tender, { id: tenderId })).status === 'notified');
  expect(await t.em().count(MailMessage, { toAddresses: { $contains: [vendors['D'].user.vendorOrganisation!.contactEmail] } })).toBe(1);
});
