import type { Response } from 'supertest';
import type { User } from '../../server/entities';
import { AuditEntry, Notice, Question, Recommendation, Run, Tender } from '../../server/entities';
import { type Browser, makeUser, signedIn, startTestApp, type TestApp } from '../support/app';
import { waitForRun } from '../support/evaluation';
import { openTender, passClosingTime, tenderBody } from '../support/tenders';
import { race as raceOn } from '../support/race';

/**
 * Decisions cannot contradict: two decisions on one tender sent at the same moment never both win.
 * Each race is made certain, not lucky: the test holds the tender's audit-chain lock (the last thing
 * every decision takes before it commits) from its own PostgreSQL connection, fires both requests
 * from distinct signed-in sessions, waits until each of them is inside its transaction waiting for a
 * lock (or has answered), and only then lets them go.
 */
jest.setTimeout(120_000);
let t: TestApp;
let buyerUser: User;
let buyers: [Browser, Browser];
let compliance: [Browser, Browser];
let vendors: { user: User; browser: Browser }[];

beforeAll(async () => {
  t = await startTestApp();
  buyerUser = await makeUser(t, 'buyer');
  // The same buyer signed in twice (a buyer acts only on its own tenders), and two compliance officers.
  buyers = [await signedIn(t, buyerUser), await signedIn(t, buyerUser)];
  compliance = [await signedIn(t, await makeUser(t, 'compliance')), await signedIn(t, await makeUser(t, 'compliance'))];
  vendors = [];
  for (let i = 0; i < 2; i++) {
    const user = await makeUser(t, 'vendor');
    vendors.push({ user, browser: await signedIn(t, user) });
  }
});
afterAll(() => t.close());

/** Races `requests` on the tender (spec/support/race.ts). */
const race = (tenderId: string, requests: (() => PromiseLike<Response>)[]): Promise<Response[]> => raceOn(t, tenderId, requests);

async function auditCount(tenderId: string, action: string): Promise<number> {
  return t.em().count(AuditEntry, { tender: tenderId, action });
}

/** A closed tender with two bids, and its built-in all-split scenario. */
async function closedTender(): Promise<{ tenderId: string; scenarioId: string }> {
  const [buyer] = buyers;
  const tenderId = await openTender(buyer, vendors.map((v) => v.user.vendorOrganisation!.id));
  for (const [i, v] of vendors.entries()) {
    const res = await v.browser.send('put', `/api/tenders/${tenderId}/bid`, {
      fixedFee: 1000 + i * 500, capacity: null, prices: { R01: 10 + i, R02: 12 - i, R03: 11 }, submit: true, version: null,
    });
    expect(res.status).toBe(200);
  }
  await passClosingTime(t, tenderId);
  const scenarios = await buyer.get(`/api/tenders/${tenderId}/scenarios`);
  expect(scenarios.status).toBe(200);
  return { tenderId, scenarioId: scenarios.body.find((s: { builtIn: string | null }) => s.builtIn === 'split').id };
}

/** A closed tender whose finished split run is recommended, awaiting compliance. */
async function awaitingDecision(): Promise<{ tenderId: string; runId: string }> {
  const { tenderId, scenarioId } = await closedTender();
  const queued = await buyers[0].post(`/api/scenarios/${scenarioId}/runs`);
  expect(queued.status).toBe(202);
  const run = await waitForRun(buyers[0], queued.body.id);
  expect(run.status).toBe('optimal');
  const rec = await buyers[0].post(`/api/tenders/${tenderId}/recommendation`, { runId: run.id, justification: 'Least total cost.' });
  expect(rec.status).toBe(201);
  return { tenderId, runId: run.id };
}

const statuses = (answers: Response[]) => answers.map((a) => a.status).sort();

test('two requests to run the same scenario at once make one run: one is queued (202), the other answers that run (200)', async () => {
  const { tenderId, scenarioId } = await closedTender();
  const answers = await race(tenderId, buyers.map((b) => () => b.post(`/api/scenarios/${scenarioId}/runs`)));
  expect(statuses(answers)).toEqual([200, 202]);
  expect(answers[0].body.id).toBe(answers[1].body.id);
  expect(await t.em().count(Run, { tender: tenderId })).toBe(1);
  expect(await auditCount(tenderId, 'run.queued')).toBe(1);
  // Asked again later, with the run solved and nothing changed: still that run, no second solve.
  await waitForRun(buyers[0], answers[0].body.id);
  const again = await buyers[0].post(`/api/scenarios/${scenarioId}/runs`);
  expect(again.status).toBe(200);
  expect(again.body).toEqual({ id: answers[0].body.id, status: 'optimal' });
  expect(await t.em().count(Run, { tender: tenderId })).toBe(1);
});

test('two resilience checks of a run at once queue each re-solve once; the second answers 200 with nothing queued', async () => {
  const { tenderId, scenarioId } = await closedTender();
  const run = await waitForRun(buyers[0], (await buyers[0].post(`/api/scenarios/${scenarioId}/runs`)).body.id);
  const awarded = run.result!.awards.length;
  expect(awarded).toBeGreaterThan(0);
  const answers = await race(tenderId, [
    () => buyers[0].post(`/api/runs/${run.id}/resilience`),
    () => compliance[0].post(`/api/runs/${run.id}/resilience`),
  ]);
  expect(answers.map((a) => [a.status, a.body.queued]).sort()).toEqual([[200, 0], [202, awarded]]);
  expect(await t.em().count(Run, { parent: run.id })).toBe(awarded);
  expect(await auditCount(tenderId, 'run.resilience-queued')).toBe(awarded);
});

test('of two recommendations made at once, one is stored and the other gets 409 saying one is awaiting compliance', async () => {
  const { tenderId, scenarioId } = await closedTender();
  const run = await waitForRun(buyers[0], (await buyers[0].post(`/api/scenarios/${scenarioId}/runs`)).body.id);
  const answers = await race(tenderId, buyers.map((b, i) => () => b.post(`/api/tenders/${tenderId}/recommendation`, { runId: run.id, justification: `Reason ${i}` })));
  expect(statuses(answers)).toEqual([201, 409]);
  const loser = answers.find((a) => a.status === 409)!;
  expect(loser.type).toBe('application/problem+json');
  expect(loser.body.detail).toMatch(/awaiting compliance/);
  const stored = await t.em().find(Recommendation, { tender: tenderId });
  expect(stored.map((r) => [r.status, r.justification])).toEqual([['recommended', answers.find((a) => a.status === 201)!.body.justification]]);
  expect(await auditCount(tenderId, 'recommendation.made')).toBe(1);
});

test('approve racing return: exactly one wins, the other gets 409, and the tender, the recommendation and the trail agree with the winner', async () => {
  const { tenderId } = await awaitingDecision();
  const answers = await race(tenderId, [
    () => compliance[0].post(`/api/tenders/${tenderId}/recommendation/approve`, { comment: 'Checked.' }),
    () => compliance[1].post(`/api/tenders/${tenderId}/recommendation/return`, { comment: 'Please look at depot 2 again.' }),
  ]);
  expect(statuses(answers)).toEqual([200, 409]);
  const loser = answers.find((a) => a.status === 409)!;
  expect(loser.type).toBe('application/problem+json');
  expect(loser.body.detail).toMatch(/awarded|No recommendation is awaiting a decision/);
  const winner = answers.find((a) => a.status === 200)!.body.status as 'approved' | 'returned';
  const tender = await t.em().findOneOrFail(Tender, { id: tenderId });
  const recommendation = await t.em().findOneOrFail(Recommendation, { tender: tenderId });
  expect({ tender: tender.status, recommendation: recommendation.status }).toEqual(
    winner === 'approved' ? { tender: 'awarded', recommendation: 'approved' } : { tender: 'closed', recommendation: 'returned' },
  );
  expect(await auditCount(tenderId, 'recommendation.approved') + await auditCount(tenderId, 'recommendation.returned')).toBe(1);
  expect(await auditCount(tenderId, `recommendation.${winner}`)).toBe(1);
});

test('two approvals at once: one awards the tender, the other gets 409, one decision in the trail', async () => {
  const { tenderId } = await awaitingDecision();
  const answers = await race(tenderId, compliance.map((c) => () => c.post(`/api/tenders/${tenderId}/recommendation/approve`, { comment: '' })));
  expect(statuses(answers)).toEqual([200, 409]);
  expect(answers.find((a) => a.status === 409)!.body.detail).toMatch(/awarded/);
  expect((await t.em().findOneOrFail(Tender, { id: tenderId })).status).toBe('awarded');
  expect(await auditCount(tenderId, 'recommendation.approved')).toBe(1);
});

test('two notice sends at once queue one notice per bidder; the second gets 409 and queues nothing', async () => {
  const { tenderId } = await awaitingDecision();
  expect((await compliance[0].post(`/api/tenders/${tenderId}/recommendation/approve`, { comment: '' })).status).toBe(200);
  const answers = await race(tenderId, buyers.map((b) => () => b.post(`/api/tenders/${tenderId}/notices`)));
  expect(statuses(answers)).toEqual([202, 409]);
  expect(answers.find((a) => a.status === 202)!.body).toEqual({ queued: vendors.length });
  expect(answers.find((a) => a.status === 409)!.body.detail).toMatch(/already been queued/);
  expect(await t.em().count(Notice, { tender: tenderId })).toBe(vendors.length);
  expect(await auditCount(tenderId, 'notices.queued')).toBe(1);
});

test('excluding an awarded bid racing the recommendation of that run: exactly one wins, and the bid, the recommendation and the trail agree', async () => {
  const { tenderId, scenarioId } = await closedTender();
  const run = await waitForRun(buyers[0], (await buyers[0].post(`/api/scenarios/${scenarioId}/runs`)).body.id);
  const awarded = run.result!.awards[0].vendor;
  const bids = (await buyers[0].get(`/api/tenders/${tenderId}/bids`)).body.bids as { id: string; vendor: { id: string } }[];
  const bidId = bids.find((b) => b.vendor.id === awarded)!.id;
  const answers = await race(tenderId, [
    () => buyers[0].send('put', `/api/tenders/${tenderId}/bids/${bidId}/compliance`, { decision: 'excluded', ground: 'other', note: 'Bid bond not provided.' }),
    () => buyers[1].post(`/api/tenders/${tenderId}/recommendation`, { runId: run.id, justification: 'Least total cost.' }),
  ]);
  const [exclusion, recommendation] = answers;
  const excludedWon = exclusion.status === 200;
  expect({ exclusion: exclusion.status, recommendation: recommendation.status }).toEqual(excludedWon ? { exclusion: 200, recommendation: 409 } : { exclusion: 409, recommendation: 201 });
  const stored = await t.em().getConnection().execute<{ decision: string | null }[]>('select compliance_decision as decision from bid where id = ?', [bidId]);
  expect({ decision: stored[0].decision, recommendations: await t.em().count(Recommendation, { tender: tenderId }) }).toEqual(
    excludedWon ? { decision: 'excluded', recommendations: 0 } : { decision: null, recommendations: 1 },
  );
  expect({ excluded: await auditCount(tenderId, 'bid.excluded'), made: await auditCount(tenderId, 'recommendation.made') }).toEqual(
    excludedWon ? { excluded: 1, made: 0 } : { excluded: 0, made: 1 },
  );
});

test('two answers to one question at once: one is published as clarification 1 (200), the other is 409 and nothing of it is stored', async () => {
  const tenderId = await openTender(buyers[0], vendors.map((v) => v.user.vendorOrganisation!.id), tenderBody(3, 10 * 24 * 60));
  const asked = await vendors[0].browser.post(`/api/tenders/${tenderId}/questions`, { text: 'Is the salt to be covered at the depot?' });
  expect(asked.status).toBe(201);
  const answers = await race(tenderId, buyers.map((b, i) => () => b.post(`/api/questions/${asked.body.id}/answer`, { text: `Answer ${i + 1}` })));
  expect(statuses(answers)).toEqual([200, 409]);
  const winner = answers.find((a) => a.status === 200)!;
  expect(winner.body.number).toBe(1);
  const stored = await t.em().findOneOrFail(Question, { id: asked.body.id });
  expect({ answer: stored.answer, number: stored.number }).toEqual({ answer: winner.body.answer, number: 1 });
  expect(await auditCount(tenderId, 'question.answered')).toBe(1);
});

test('two cancellations at once: one cancels (200), the other is 409; one audit entry', async () => {
  const tenderId = await openTender(buyers[0], vendors.map((v) => v.user.vendorOrganisation!.id));
  const answers = await race(tenderId, buyers.map((b, i) => () => b.post(`/api/tenders/${tenderId}/cancel`, { reason: `Reason ${i + 1}` })));
  expect(statuses(answers)).toEqual([200, 409]);
  expect((await t.em().findOneOrFail(Tender, { id: tenderId })).status).toBe('cancelled');
  expect(await auditCount(tenderId, 'tender.cancelled')).toBe(1);
});

test('an amendment racing a cancellation never lands on a cancelled tender', async () => {
  const tenderId = await openTender(buyers[0], vendors.map((v) => v.user.vendorOrganisation!.id));
  const later = new Date(Date.now() + 5 * 3_600_000).toISOString();
  const [amended, cancelled] = await race(tenderId, [
    () => buyers[0].post(`/api/tenders/${tenderId}/amendments`, { reason: 'More time', closesAt: later }),
    () => buyers[1].post(`/api/tenders/${tenderId}/cancel`, { reason: 'No longer needed' }),
  ]);
  expect(cancelled.status).toBe(200);
  const trail = (await t.em().find(AuditEntry, { tender: tenderId }, { orderBy: { seq: 'asc' } })).map((e) => e.action);
  // Either the amendment came first and is recorded before the cancellation, or it was refused.
  const outcome = amended.status === 201
    ? { status: 201, amendedFirst: trail.indexOf('tender.amended') < trail.indexOf('tender.cancelled') }
    : { status: amended.status, amendedFirst: trail.includes('tender.amended') };
  expect([{ status: 201, amendedFirst: true }, { status: 409, amendedFirst: false }]).toContainEqual(outcome);
  expect(trail.filter((a) => a === 'tender.cancelled')).toHaveLength(1);
});
