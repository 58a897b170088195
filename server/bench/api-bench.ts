import type autocannon from 'autocannon';
import { deadlineRush, rushHolds, rushTable } from './rush';
import { benchEnv, startServer, stopAll } from './support/processes';
import { call, headersOf, signIn, signInAll, type Session } from './support/http';
import { drive, driveMany, summarise, summaryTable, type DriveOptions, type Summary } from './support/measure';
import { BENCH_PASSWORD, seedBenchData } from './support/seed';

/**
 * `npm run bench:api [-- --skip-rush]`: the API under load, on a throwaway cluster (see
 * support/with-cluster.sh). The built server runs as its own process (`node dist/server/main.js`);
 * this process drives it over 127.0.0.1 with autocannon, every phase bounded in count and time:
 *
 *   (d) GET /api/session, signed in: the baseline of the stack itself (session, user, JSON);
 *   (a) GET /api/tenders as vendors (27 tenders visible each);
 *   (b) PUT /api/tenders/:id/bid by 50 vendors at once (40 regions, draft saves over the
 *       version each one loaded — one autocannon instance per vendor, one connection each);
 *   (c) GET /api/tenders/:id/bids of a closed tender, 30 vendors × 200 regions, as a buyer;
 *
 * then the deadline rush (200 vendors submitting across the closing time). Prints tables and
 * whether each target is met; asserts nothing. `--only b` (or `a,c`…) runs the baseline and those
 * phases alone, e.g. to profile one of them (BENCH_NODE_ARGS, see support/processes.ts).
 */
const VENDORS_AT_ONCE = 50;
const PER_VENDOR = 40;
const MAX_SECONDS = 20;

function perVendor(url: string, sessions: Session[], make: (s: Session) => Partial<DriveOptions>): DriveOptions[] {
  return sessions.map((s) => ({ url, connections: 1, amount: PER_VENDOR, maxSeconds: MAX_SECONDS, headers: headersOf(s), ...make(s) }));
}

async function main(): Promise<void> {
  const skipRush = process.argv.includes('--skip-rush');
  const onlyAt = process.argv.indexOf('--only');
  const only = onlyAt > 0 ? new Set(['d', ...(process.argv[onlyAt + 1] ?? '').split(',')]) : new Set(['a', 'b', 'c', 'd']);
  const { databaseUrl } = benchEnv();
  const seeded = await seedBenchData(databaseUrl, 200);
  const { proc, url } = await startServer();
  process.stdout.write(`[bench] server pid ${proc.child.pid} at ${url}; signing in 201 people\n`);
  const buyer = await signIn(url, seeded.buyerEmail, BENCH_PASSWORD);
  const vendors = await signInAll(url, seeded.vendors.map((v) => v.email), BENCH_PASSWORD);
  const fifty = vendors.slice(0, VENDORS_AT_ONCE);
  process.stdout.write('[bench] signed in; warming up\n');

  const sessionPhase = (label: string) => driveMany(label, perVendor(`${url}/api/session`, fifty, () => ({})));
  const listPhase = (label: string) => driveMany(label, perVendor(`${url}/api/tenders`, fifty, () => ({})));
  const versions = new Map<string, number | null>();
  const bidPhase = async (label: string) => {
    // Each vendor saves over the version it loaded, then over the one each save returns, as the client does.
    for (const s of fifty) versions.set(s.email, (await call<{ bid: { version: number } | null }>(url, s, 'GET', `/api/tenders/${seeded.open.id}/bid`)).body.bid?.version ?? null);
    return driveMany(label, perVendor(url, fifty, (s) => {
      let version = versions.get(s.email) ?? null;
      let fee = 30_000;
      const prices = Object.fromEntries(seeded.open.regionCodes.map((c, k) => [c, 55 + (k % 9)]));
      return {
        requests: [{
          method: 'PUT', path: `/api/tenders/${seeded.open.id}/bid`, headers: headersOf(s, true),
          setupRequest: (req: autocannon.RequestSpec) => ({ ...req, body: JSON.stringify({ fixedFee: fee++, capacity: 5000, prices, submit: false, version }) }),
          onResponse: (status: number, body: string) => {
            if (status === 200) version = (JSON.parse(body) as { version: number }).version;
          },
        }],
      };
    }));
  };
  const tabulationPhase = (label: string) =>
    drive(label, { url: `${url}/api/tenders/${seeded.big.id}/bids`, connections: 5, amount: 250, maxSeconds: MAX_SECONDS, headers: headersOf(buyer) });

  // Warm-up (not counted): JIT, connection pools, PostgreSQL's caches.
  const phases = [
    { key: 'd', run: sessionPhase, label: '(d) GET /api/session (baseline)' },
    { key: 'a', run: listPhase, label: '(a) GET /api/tenders, vendor' },
    { key: 'b', run: bidPhase, label: '(b) PUT bid, 50 vendors' },
    { key: 'c', run: tabulationPhase, label: '(c) GET bids 30x200, buyer' },
  ].filter((p) => only.has(p.key));
  for (const { run } of phases) {
    const p = await run('warm-up');
    process.stdout.write(`[bench] warm-up: ${p.latencies.length} answers in ${p.seconds.toFixed(1)} s, statuses ${JSON.stringify([...p.statuses])}\n`);
  }

  const rows = new Map<string, Summary>();
  for (const { key, run, label } of phases) rows.set(key, summarise(await run(label)));
  process.stdout.write(`\nAPI under load: ${VENDORS_AT_ONCE} connections for (a) (b) (d) (${PER_VENDOR} requests each), 5 for (c)\n`);
  process.stdout.write(summaryTable([...rows.values()]));
  const verdict = (ok: boolean) => (ok ? 'met' : 'MISSED');
  const d = rows.get('d')!;
  const targets = [`target: 0 errors ......................... ${verdict([...rows.values()].every((r) => r.errors === 0))}`];
  for (const key of ['a', 'b'] as const) {
    const r = rows.get(key);
    if (r) targets.push(`target: (${key}) p95 <= 3 x baseline p95 ...... ${verdict(r.p95 <= 3 * d.p95)} (${r.p95.toFixed(1)} vs ${(3 * d.p95).toFixed(1)} ms)`);
  }
  const c = rows.get('c');
  if (c) targets.push(`target: (c) p95 < 250 ms ................. ${verdict(c.p95 < 250)} (${c.p95.toFixed(1)} ms)`);
  process.stdout.write(targets.join('\n') + '\n');

  if (!skipRush) {
    const rush = await deadlineRush(url, databaseUrl, seeded.rush, vendors, { before: 3, after: 1 });
    process.stdout.write(`\nDeadline rush: ${rush.vendors} vendors submit over the last 3 s before closing and 1 s after\n`);
    process.stdout.write(rushTable(rush));
    process.stdout.write(`rule: accepted bids complete and stamped before closing, later ones refused, no other error ... ${rushHolds(rush) ? 'holds' : 'BROKEN'}\n`);
  }
}

main()
  .catch((err: unknown) => {
    process.stderr.write(`[bench] failed: ${err instanceof Error ? err.stack : String(err)}\n`);
    process.exitCode = 1;
  })
  .finally(() => stopAll());
