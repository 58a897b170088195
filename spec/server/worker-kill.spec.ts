import { spawn, type ChildProcess } from 'node:child_process';
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { Bid, BidLine, Invitation, Region, Run, Scenario, Tender, VendorOrganisation } from '../../server/entities';
import { makeUser, signedIn, startTestApp, type TestApp } from '../support/app';
import { waitFor } from '../support/wait';

/**
 * A solve worker killed in the middle of a run: the job expires, another worker process takes it,
 * and the run completes — nothing lost. Uses the built worker (dist/server/worker.js), as
 * `npm run worker` would start it on another machine.
 */
jest.setTimeout(180_000);

const root = path.join(__dirname, '..', '..');
let t: TestApp;
const workers: ChildProcess[] = [];

function startWorker(): ChildProcess {
  const child = spawn(process.execPath, [path.join(root, 'dist/server/worker.js')], {
    env: { ...process.env, DATABASE_URL: t.config.databaseUrl, SMTP_URL: t.config.smtpUrl, QUEUE_MAINTENANCE_SECONDS: '1', LOG_LEVEL: 'warn' },
    stdio: ['ignore', 'ignore', 'inherit'],
  });
  workers.push(child);
  return child;
}

/** Linux's number for SCHED_IDLE (sched.h), as /proc/PID/task/TID/stat reports it. */
const SCHED_IDLE = 5;
/**
 * The least niceness of a helper solver thread in a worker at the default WORKER_NICE (5): glpk.js
 * runs 10 steps below it; on a model this large the neighbourhood search takes its place, 5 steps
 * below while it gains and at 19 once stalled (server/award/workers/low-priority.ts, lns-worker.ts).
 */
const HELPER_THREAD_NICE_AT_LEAST = 5 + 5;

/** Niceness (field 19) and scheduling policy (field 41) of every thread of a process, from /proc. */
function threadsOf(pid: number): { nice: number; policy: number }[] {
  return readdirSync(`/proc/${pid}/task`).map((tid) => {
    const stat = readFileSync(`/proc/${pid}/task/${tid}/stat`, 'utf8');
    // Fields after the command name, which is in parentheses and may hold spaces: field 3 onwards.
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    return { nice: Number(fields[19 - 3]), policy: Number(fields[41 - 3]) };
  });
}

beforeAll(async () => {
  t = await startTestApp({ solver: false });
});
afterAll(async () => {
  for (const w of workers) if (w.exitCode === null) w.kill('SIGKILL');
  await t.close();
});

/** A closed tender hard enough that a sole-award solve runs to its time limit (random positions, tight caps). */
async function hardTender(buyerId: string): Promise<{ tender: string; scenario: string }> {
  const em = t.em();
  let seed = 7;
  const rnd = () => ((seed = (seed * 48271) % 2147483647) / 2147483647);
  const tender = em.create(Tender, {
    reference: `HARD-${Date.now()}`, title: 'Hard instance', commodity: 'Salt', unit: 't', currency: 'EUR',
    closesAt: new Date(Date.now() - 60_000), status: 'closed', createdBy: buyerId,
  });
  const regions = Array.from({ length: 150 }, (_, j) => ({ x: rnd(), y: rnd(), r: em.create(Region, { tender, code: `R${j}`, name: `Region ${j}`, forecast: 50 + Math.round(rnd() * 150), position: j }) }));
  const total = regions.reduce((s, r) => s + r.r.forecast, 0);
  for (let i = 0; i < 30; i++) {
    const x = rnd(), y = rnd();
    const org = em.create(VendorOrganisation, { name: `Hard vendor ${i}`, registrationNumber: `H-${Date.now()}-${i}`, sme: i % 3 === 0, contactEmail: `h${i}@hard.test` });
    em.create(Invitation, { tender, vendorOrganisation: org, invitedBy: buyerId });
    const bid = em.create(Bid, { tender, vendorOrganisation: org, status: 'submitted', fixedFee: 2000 + Math.round(rnd() * 3000), capacity: Math.round(total / 7), revision: 1, submittedAt: new Date(), digest: 'x'.repeat(64) });
    for (const { x: rx, y: ry, r } of regions) em.create(BidLine, { bid, region: r, unitPrice: Math.round((5 + 40 * Math.hypot(x - rx, y - ry)) * 100) / 100 });
  }
  const scenario = em.create(Scenario, { tender, name: 'Sole, hard', rules: { sourcing: 'sole', soleRegions: [], exclude: [], require: [] }, timeLimitSeconds: 4 });
  await em.flush();
  return { tender: tender.id, scenario: scenario.id };
}

test('a worker killed mid-run: the run is retried by another worker and completes', async () => {
  const buyerUser = await makeUser(t, 'buyer');
  const buyer = await signedIn(t, buyerUser);
  const { scenario } = await hardTender(buyerUser.id);
  const first = startWorker();
  const queued = await buyer.post(`/api/scenarios/${scenario}/runs`);
  expect(queued.status).toBe(202);
  const runId = queued.body.id as string;

  // Kill the first worker as soon as it has claimed the run.
  await waitFor('the first worker to claim the run', async () => (await t.em().findOneOrFail(Run, { id: runId })).status === 'solving', { everyMs: 50 });
  // Meanwhile every thread of the worker, its solver threads included, is in Linux's SCHED_IDLE
  // class (WORKER_SCHED=idle, the default), so the solve only takes CPU nothing else wants. The
  // helper solver thread (glpk.js, or the neighbourhood search on a model this large) is known by
  // its niceness, at least 5 steps below the process's (low-priority.ts).
  if (process.platform === 'linux') {
    const threads = await waitFor('the helper solver thread at its lower priority',
      () => { const all = threadsOf(first.pid!); return all.some((th) => th.nice >= HELPER_THREAD_NICE_AT_LEAST) && all; },
      { timeoutMs: 10_000, everyMs: 50 });
    expect(new Set(threads.map((th) => th.policy))).toEqual(new Set([SCHED_IDLE]));
  }
  first.kill('SIGKILL');
  await new Promise((r) => first.once('exit', r));
  expect((await t.em().findOneOrFail(Run, { id: runId })).status).toBe('solving');

  startWorker();
  const run = await waitFor('the second worker to finish the run', async () => {
    const r = await t.em().findOneOrFail(Run, { id: runId });
    return !['queued', 'solving'].includes(r.status) && r;
  }, { timeoutMs: 120_000 });
  expect(['optimal', 'feasible']).toContain(run.status);
  expect(run.attempts).toBe(2);
  expect(run.result!.awards.length).toBeGreaterThan(0);
});
