import type autocannon from 'autocannon';
import { Client } from 'pg';
import { SESSION_POOL_OPTIONS } from '../context';
import { tenderListJsonStatement } from '../services/queries/tenders.queries';
import { deadlineRush, rushHolds, rushTable, RUSH_REGIONS, RUSH_VENDORS } from './rush';
import { benchEnv, startBare, startServer, startWorker, stopAll, waitForLog } from './support/processes';
import { call, headersOf, signIn, signInAll, type Session } from './support/http';
import { cpuMeter, drive, driveMany, joinPhases, summarise, summaryTable, type DriveOptions, type Phase, type Summary } from './support/measure';
import { BENCH_PASSWORD, seedBenchData } from './support/seed';

/**
 * `npm run bench:api [-- --skip-rush] [-- --only a,b | --only rush]`: the API under load, on a throwaway cluster
 * (see support/with-cluster.sh). The built server runs as its own process (`node dist/server/main.js`)
 * and so does the yardstick, bare Express 5 with one route and no middleware
 * (`dist/server/bench/bare-server.js`); this process drives both over 127.0.0.1 with autocannon,
 * every phase bounded in count and time, and prints every phase's requests/s also as a percentage
 * of bare Express's in the same run (the machine's speed and load cancel out; each phase is measured
 * in slices, each right after a slice of bare Express, see ROUNDS):
 *
 *   (0) GET /api/session of bare Express, 20 connections: the yardstick;
 *   (d) GET /api/session signed in, 20 connections (20 vendors' sessions in turn);
 *   (a) GET /api/tenders as vendors (27 tenders visible each: the first page of 25), 20 connections;
 *   (e) GET /api/tenders as the buyer, 1,000 tenders and more in the list (the first page of 25,
 *       with the count of all, as the list screen opens), 20 connections;
 *   (b) PUT /api/tenders/:id/bid by 50 vendors at once, each on a tender of its own (40 regions,
 *       draft saves over the version each one loaded — one autocannon instance per vendor);
 *   (c) GET /api/tenders/:id/bids of a closed tender, 30 vendors × 200 regions, as a buyer;
 *
 * then the deadline rush (see rush.ts). Prints tables and whether each target is met; asserts
 * nothing. `--only b` (or `a,c`…) runs the yardstick, the baseline and those phases alone, e.g. to
 * profile one of them (BENCH_NODE_ARGS, see support/processes.ts); `--only rush` runs the deadline
 * rush alone.
 */
const CONNECTIONS = 20;
const VENDORS_AT_ONCE = 50;
const PER_VENDOR = 40;
/** Seconds of one measured slice; warm-up slices are as long. */
let MAX_SECONDS = 10;
/**
 * Each phase is measured in slices alternating with slices of bare Express (bare, phase, bare,
 * phase…), and its percentage is of the bare slices around it: on a machine shared with other
 * work, the load changes from one minute to the next, and pairing cancels most of that out.
 */
const ROUNDS = 3;
const SLICE_SECONDS = 4;
/** Requests in all of a 20-connection phase (it stops at MAX_SECONDS before that, except bare Express). */
const PHASE_REQUESTS = 20_000;
const BUYER_BULK = 1000;

function perVendor(url: string, sessions: Session[], make: (s: Session) => Partial<DriveOptions>): DriveOptions[] {
  return sessions.map((s) => ({ url, connections: 1, amount: PER_VENDOR, maxSeconds: MAX_SECONDS, headers: headersOf(s), ...make(s) }));
}

/** One autocannon instance, 20 connections, each request carrying the next session's cookies in turn. */
function rotating(url: string, sessions: Session[]): DriveOptions {
  let k = 0;
  return {
    url, connections: CONNECTIONS, amount: PHASE_REQUESTS, maxSeconds: MAX_SECONDS,
    requests: [{ method: 'GET', setupRequest: (req: autocannon.RequestSpec) => ({ ...req, headers: headersOf(sessions[k++ % sessions.length]) }) }],
  };
}

/**
 * `--explain`: the plans of the buyer's and a vendor's first page of the tender list, on the bench
 * data — the statement the route sends (with its JSON), planned as the session pool plans it (the
 * generic plan, SESSION_POOL_OPTIONS), after a few runs as on a warm connection.
 */
async function explainLists(databaseUrl: string, buyerId: string, vendorOrgId: string): Promise<void> {
  const db = new Client({ connectionString: databaseUrl, options: SESSION_POOL_OPTIONS });
  await db.connect();
  try {
    const first = { page: 1, size: 25, sort: 'closesAt', dir: 'desc' } as const;
    for (const [n, [label, filter]] of ([
      ['buyer, first page', { ...first, vendorOrganisationId: null, ownerId: buyerId }],
      ['buyer, page 20', { ...first, page: 20, vendorOrganisationId: null, ownerId: buyerId }],
      ['vendor, first page', { ...first, vendorOrganisationId: vendorOrgId, ownerId: null }],
    ] as const).entries()) {
      const { text, values } = tenderListJsonStatement(filter);
      const plain = `explain-${n}`;
      await db.query(`prepare "${plain}" as ${text}`);
      const args = values.map((v) => db.escapeLiteral(String(v))).join(', ');
      for (let k = 0; k < 3; k++) await db.query(`execute "${plain}"(${args})`);
      const { rows } = await db.query<{ 'QUERY PLAN': string }>(`explain (analyze, buffers, costs off) execute "${plain}"(${args})`);
      process.stdout.write(`\n[bench] plan of the tender list, ${label}:\n${rows.map((r) => r['QUERY PLAN']).join('\n')}\n`);
    }
  } finally {
    await db.end();
  }
}

async function main(): Promise<void> {
  const skipRush = process.argv.includes('--skip-rush');
  const onlyAt = process.argv.indexOf('--only');
  const onlyKeys = onlyAt > 0 ? (process.argv[onlyAt + 1] ?? '').split(',') : null;
  // `--only rush`: the deadline rush alone, no phase measured before it.
  const rushOnly = onlyKeys?.join(',') === 'rush';
  if (rushOnly && skipRush) throw new Error('--only rush and --skip-rush leave nothing to run.');
  const only = rushOnly ? new Set<string>() : onlyKeys ? new Set(['0', 'd', ...onlyKeys]) : new Set(['0', 'a', 'b', 'c', 'd', 'e']);
  const { databaseUrl, dir: benchDir } = benchEnv();
  const seeded = await seedBenchData(databaseUrl, { vendors: skipRush ? 200 : RUSH_VENDORS, rushRegions: RUSH_REGIONS, buyerBulk: BUYER_BULK });
  if (process.argv.includes('--explain')) await explainLists(databaseUrl, seeded.buyerId, seeded.vendors[0].orgId);
  const bare = await startBare();
  // The layout of several machines (README): a web process that serves only, and a worker process
  // for the jobs (receipts and other mail, reminders, closing). The web process is what is
  // measured; the jobs it ran in the same process before (the reminder pass over every invited
  // vendor, mail) were a share of its CPU unrelated to any request.
  // The mail catcher too runs in a process of its own: the reminders and receipts the worker sends
  // while phases run were parsed and stored by the measured process (about 2.5 % of its CPU in
  // phase d, profiled).
  const mail = await startServer({ RUN_WORKERS: '0' }, { name: 'mail' });
  const { proc, url, smtpUrl } = await startServer({ RUN_WORKERS: '0' }, { smtpUrl: mail.smtpUrl });
  const jobs = startWorker(1, { SMTP_URL: smtpUrl });
  await waitForLog(jobs, 'worker ready');
  const people = skipRush ? 200 : RUSH_VENDORS;
  process.stdout.write(`[bench] server pid ${proc.child.pid} at ${url}, bare Express pid ${bare.proc.child.pid}; signing in ${people + 1} people\n`);
  const buyer = await signIn(url, seeded.buyerEmail, BENCH_PASSWORD);
  const vendors = await signInAll(url, seeded.vendors.slice(0, people).map((v) => v.email), BENCH_PASSWORD);
  const fifty = vendors.slice(0, VENDORS_AT_ONCE);
  const twenty = vendors.slice(0, CONNECTIONS);
  process.stdout.write('[bench] signed in; warming up\n');

  // CPU per request besides requests/s: on a machine shared with other work, far steadier.
  const onBare = cpuMeter(bare.proc.child.pid!, null);
  const onServer = cpuMeter(proc.child.pid!, `${benchDir}/pg`);
  const barePhase = (label: string) => onBare(() => drive(label, { url: `${bare.url}/api/session`, connections: CONNECTIONS, amount: PHASE_REQUESTS, maxSeconds: MAX_SECONDS }));
  const sessionPhase = (label: string) => onServer(() => drive(label, rotating(`${url}/api/session`, twenty)));
  const listPhase = (label: string) => onServer(() => drive(label, rotating(`${url}/api/tenders`, twenty)));
  const buyerListPhase = (label: string) => onServer(() => drive(label, rotating(`${url}/api/tenders`, [buyer])));
  const versions = new Map<string, number | null>();
  const ownTender = new Map(fifty.map((s, k) => [s.email, seeded.own[k]]));
  const bidPhase = async (label: string) => {
    // Each vendor saves over the version it loaded, then over the one each save returns, as the client does.
    for (const s of fifty) versions.set(s.email, (await call<{ bid: { version: number } | null }>(url, s, 'GET', `/api/tenders/${ownTender.get(s.email)!.id}/bid`)).body.bid?.version ?? null);
    return onServer(() => driveMany(label, perVendor(url, fifty, (s) => {
      const tender = ownTender.get(s.email)!;
      let version = versions.get(s.email) ?? null;
      let fee = 30_000;
      const prices = Object.fromEntries(tender.regionCodes.map((c, k) => [c, 55 + (k % 9)]));
      return {
        requests: [{
          method: 'PUT', path: `/api/tenders/${tender.id}/bid`, headers: headersOf(s, true),
          setupRequest: (req: autocannon.RequestSpec) => ({ ...req, body: JSON.stringify({ fixedFee: fee++, capacity: 5000, prices, submit: false, version }) }),
          onResponse: (status: number, body: string) => {
            if (status === 200) version = (JSON.parse(body) as { version: number }).version;
          },
        }],
      };
    })));
  };
  const tabulationPhase = (label: string) =>
    onServer(() => drive(label, { url: `${url}/api/tenders/${seeded.big.id}/bids`, connections: 5, amount: 250, maxSeconds: MAX_SECONDS * 2, headers: headersOf(buyer) }));

  const phases = [
    { key: '0', run: barePhase, label: '(0) bare Express 5, one route' },
    { key: 'd', run: sessionPhase, label: '(d) GET /api/session signed in' },
    { key: 'a', run: listPhase, label: '(a) GET /api/tenders, vendor' },
    { key: 'e', run: buyerListPhase, label: `(e) GET /api/tenders, buyer (25 of ${seeded.buyerTenders})` },
    { key: 'b', run: bidPhase, label: '(b) PUT bid, 50 vendors, own tenders' },
    { key: 'c', run: tabulationPhase, label: '(c) GET bids 30x200, buyer' },
  ].filter((p) => only.has(p.key));
  // Warm-up (not counted): JIT, connection pools, PostgreSQL's caches.
  MAX_SECONDS = 5;
  for (const { run } of phases) {
    const p = await run('warm-up');
    process.stdout.write(`[bench] warm-up: ${p.latencies.length} answers in ${p.seconds.toFixed(1)} s, statuses ${JSON.stringify([...p.statuses])}\n`);
  }

  if (phases.length) {
    const rows = new Map<string, Summary>();
    const bareSlices: Phase[] = [];
    MAX_SECONDS = SLICE_SECONDS;
    for (const { key, run, label } of phases) {
      if (key === '0') continue;
      if (key === 'c') {
        rows.set(key, summarise(await run(label)));
        continue;
      }
      const mine: Phase[] = [];
      const around: Phase[] = [];
      for (let r = 0; r < ROUNDS; r++) {
        around.push(await barePhase('bare'));
        mine.push(await run(label));
      }
      bareSlices.push(...around);
      const paired = summarise(joinPhases('bare', around));
      rows.set(key, { ...summarise(joinPhases(label, mine)), baseRps: paired.rps });
    }
    const base = summarise(joinPhases('(0) bare Express 5, one route', bareSlices));
    rows.set('0', base);
    const order = ['0', 'd', 'a', 'e', 'b', 'c'];
    const ordered = order.map((k) => rows.get(k)).filter((r): r is Summary => !!r);
    process.stdout.write(`\nAPI under load: ${CONNECTIONS} connections for (0) (d) (a) (e), ${VENDORS_AT_ONCE} vendors at once for (b), 5 connections for (c); `
      + `(d) (a) (e) (b) in ${ROUNDS} slices of ${SLICE_SECONDS} s, each after a slice of bare Express; % of bare = of those bare slices (c: of all)\n`);
    process.stdout.write(summaryTable(ordered, base.rps));
    const verdict = (ok: boolean) => (ok ? 'met' : 'MISSED');
    const d = rows.get('d')!;
    const targets = [`target: 0 errors ......................... ${verdict([...rows.values()].every((r) => r.errors === 0))}`];
    const shares: [string, number][] = [['d', 40], ['a', 25], ['e', 15], ['b', 10]];
    for (const [key, pct] of shares) {
      const r = rows.get(key);
      const of = r?.baseRps ?? base.rps;
      if (r) targets.push(`target: (${key}) >= ${pct} % of bare Express ...... ${verdict(r.rps >= (pct / 100) * of)} (${((100 * r.rps) / of).toFixed(1)} %)`);
    }
    for (const key of ['a', 'b'] as const) {
      const r = rows.get(key);
      if (r) targets.push(`target: (${key}) p95 <= 3 x baseline p95 ...... ${verdict(r.p95 <= 3 * d.p95)} (${r.p95.toFixed(1)} vs ${(3 * d.p95).toFixed(1)} ms)`);
    }
    const c = rows.get('c');
    if (c) targets.push(`target: (c) p95 < 250 ms ................. ${verdict(c.p95 < 250)} (${c.p95.toFixed(1)} ms)`);
    process.stdout.write(targets.join('\n') + '\n');
  }

  if (!skipRush) {
    const o = { before: 500, after: 100, beforeSeconds: 10, afterSeconds: 2 };
    const rush = await deadlineRush(url, databaseUrl, seeded.rush, vendors, o);
    process.stdout.write(`\nDeadline rush: ${o.before} vendors submit ${RUSH_REGIONS}-region bids on one tender over the last ${o.beforeSeconds} s before closing, ${o.after} more over the ${o.afterSeconds} s after\n`);
    process.stdout.write(rushTable(rush));
    process.stdout.write(`rule: accepted bids complete and receipted, later ones refused, no other error ... ${rushHolds(rush) ? 'holds' : 'BROKEN'}\n`);
    if (rush.refusedSentBeforeClosing) process.stdout.write(`note: ${rush.refusedSentBeforeClosing} bids sent before closing were refused (their save was decided after it)\n`);
  }
}

main()
  .catch((err: unknown) => {
    process.stderr.write(`[bench] failed: ${err instanceof Error ? err.stack : String(err)}\n`);
    process.exitCode = 1;
  })
  .finally(() => stopAll());
