import { readdirSync, readFileSync } from 'node:fs';
import { performance } from 'node:perf_hooks';
import autocannon from 'autocannon';

/**
 * One measured phase. Latencies are collected from autocannon's `response` events rather than its
 * own histogram, so that phases driven by many autocannon instances at once (one per vendor) are
 * summed up the same way as phases driven by one instance.
 */
export interface Phase {
  label: string;
  seconds: number;
  latencies: number[];
  /** Answers other than the expected status, plus connection errors and timeouts. */
  errors: number;
  statuses: Map<number, number>;
  /** CPU time the measured processes and this load driver used during the phase (see `cpuMeter`), in ms. */
  cpu?: { server: number; db: number; driver: number };
}

export interface DriveOptions {
  url: string;
  connections: number;
  /** Requests in all (bounded in count)… */
  amount?: number;
  /** …and in time, whichever comes first. */
  maxSeconds: number;
  /** A fixed request rate instead of as fast as possible (for measuring a server while it works). */
  overallRate?: number;
  method?: string;
  headers?: Record<string, string>;
  body?: string;
  requests?: autocannon.AutocannonRequest[];
  expectStatus?: number;
  /** Stops the phase early when this settles (e.g. a steady load until some work is done). */
  stopWhen?: Promise<unknown>;
}

const active = new Set<autocannon.Instance>();

/** Stops every load still running (on Ctrl-C: a server waits for its open connections to close). */
export function stopLoads(): void {
  for (const instance of active) instance.stop();
}

function empty(label: string): Phase {
  return { label, seconds: 0, latencies: [], errors: 0, statuses: new Map() };
}

async function one(opts: DriveOptions, into: Phase): Promise<void> {
  const given = { amount: opts.amount, overallRate: opts.overallRate, method: opts.method, headers: opts.headers, body: opts.body, requests: opts.requests };
  // autocannon takes an explicit `undefined` as a value (e.g. "undefined HTTP method"): pass only what is set.
  const optional = Object.fromEntries(Object.entries(given).filter(([, v]) => v !== undefined));
  const instance = autocannon({ url: opts.url, connections: opts.connections, pipelining: 1, duration: opts.maxSeconds, timeout: 30, ...optional });
  const expected = opts.expectStatus ?? 200;
  instance.on('response', (_client: unknown, status: number, _bytes: number, ms: number) => {
    into.latencies.push(ms);
    into.statuses.set(status, (into.statuses.get(status) ?? 0) + 1);
    if (status !== expected) into.errors += 1;
  });
  // With `amount` autocannon ignores `duration`: the time bound is kept here.
  const cap = setTimeout(() => instance.stop(), opts.maxSeconds * 1000);
  const stop = () => instance.stop();
  opts.stopWhen?.then(stop, stop);
  active.add(instance);
  let result: autocannon.Result;
  try {
    result = await instance;
  } finally {
    active.delete(instance);
    clearTimeout(cap);
  }
  into.errors += result.errors + result.timeouts;
}

/** Drives one endpoint with one autocannon instance. */
export async function drive(label: string, opts: DriveOptions): Promise<Phase> {
  return driveMany(label, [opts]);
}

/** Drives several autocannon instances at once (e.g. one per signed-in vendor) as one phase. */
export async function driveMany(label: string, all: DriveOptions[]): Promise<Phase> {
  const phase = empty(label);
  const t0 = performance.now();
  await Promise.all(all.map((o) => one(o, phase)));
  phase.seconds = (performance.now() - t0) / 1000;
  return phase;
}

/** Several measured slices of one phase as one (their requests, time, errors and statuses summed). */
export function joinPhases(label: string, parts: Phase[]): Phase {
  const out = empty(label);
  for (const p of parts) {
    out.seconds += p.seconds;
    for (const ms of p.latencies) out.latencies.push(ms);
    out.errors += p.errors;
    for (const [status, n] of p.statuses) out.statuses.set(status, (out.statuses.get(status) ?? 0) + n);
    if (p.cpu) out.cpu = { server: (out.cpu?.server ?? 0) + p.cpu.server, db: (out.cpu?.db ?? 0) + p.cpu.db, driver: (out.cpu?.driver ?? 0) + p.cpu.driver };
  }
  return out;
}

/** Linux's clock ticks per second for /proc/PID/stat times (USER_HZ, 100 on every common build). */
const TICKS_PER_SECOND = 100;

/**
 * User plus system CPU time of a process so far, in ms (0 once it has gone); with `reaped`, also
 * that of its children that have exited (PostgreSQL backends whose pool connection was closed).
 */
function processCpuMs(pid: number, reaped = false): number {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    // Fields after the command name (which may hold spaces, inside parentheses): utime, stime,
    // cutime and cstime are the 12th to the 15th.
    const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ').map(Number);
    return ((f[11] + f[12] + (reaped ? f[13] + f[14] : 0)) * 1000) / TICKS_PER_SECOND;
  } catch {
    return 0;
  }
}

/** The PostgreSQL postmaster of a cluster folder and its backends (processes whose parent it is). */
function clusterPids(pgDir: string): number[] {
  const postmaster = Number(readFileSync(`${pgDir}/postmaster.pid`, 'utf8').split('\n')[0]);
  const children = readdirSync('/proc').filter((d) => /^\d+$/.test(d)).map(Number).filter((pid) => {
    try {
      const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
      return Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[1]) === postmaster;
    } catch {
      return false;
    }
  });
  return [postmaster, ...children];
}

/**
 * CPU time per request, which a machine shared with other work changes far less than requests/s:
 * user + system time of the measured server process and of the PostgreSQL cluster's processes over
 * a phase (a backend that exits meanwhile is counted through its parent, the postmaster), and of
 * this process, the load driver (autocannon): a driver near a whole core (its µs/req × req/s near
 * a million) limits the phase, not the server.
 */
export function cpuMeter(serverPid: number, pgDir: string | null): <T extends Phase>(run: () => Promise<T>) => Promise<T> {
  // The postmaster first, with the time of the backends it has reaped, then the live ones.
  const db = () => (pgDir ? clusterPids(pgDir).reduce((sum, pid, k) => sum + processCpuMs(pid, k === 0), 0) : 0);
  return async (run) => {
    const driver = () => {
      const u = process.cpuUsage();
      return (u.user + u.system) / 1000;
    };
    const before = { server: processCpuMs(serverPid), db: db(), driver: driver() };
    const phase = await run();
    phase.cpu = { server: processCpuMs(serverPid) - before.server, db: db() - before.db, driver: driver() - before.driver };
    return phase;
  };
}

/** Nearest-rank percentile of a list of milliseconds. */
export function percentile(values: number[], p: number): number {
  if (!values.length) return NaN;
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1))];
}

export interface Summary {
  label: string;
  /** The requests/s this row is a percentage of, when not the table's own base. */
  baseRps?: number;
  requests: number;
  rps: number;
  p50: number;
  p95: number;
  p99: number;
  errors: number;
  /** CPU µs per request of the server process, of PostgreSQL and of the load driver, when measured. */
  serverCpuUs?: number;
  dbCpuUs?: number;
  driverCpuUs?: number;
}

export function summarise(p: Phase): Summary {
  const n = p.latencies.length || 1;
  return {
    ...(p.cpu ? { serverCpuUs: (1000 * p.cpu.server) / n, dbCpuUs: (1000 * p.cpu.db) / n, driverCpuUs: (1000 * p.cpu.driver) / n } : {}),
    label: p.label,
    requests: p.latencies.length,
    rps: p.latencies.length / (p.seconds || 1),
    p50: percentile(p.latencies, 50),
    p95: percentile(p.latencies, 95),
    p99: percentile(p.latencies, 99),
    errors: p.errors,
  };
}

/** A fixed-width table; numbers right-aligned. */
export function table(headers: string[], rows: (string | number)[][]): string {
  const cells = rows.map((r) => r.map((c) => (typeof c === 'number' ? (Number.isInteger(c) ? String(c) : c.toFixed(1)) : c)));
  const widths = headers.map((h, k) => Math.max(h.length, ...cells.map((r) => r[k].length)));
  const line = (r: string[]) => r.map((c, k) => (k === 0 ? c.padEnd(widths[k]) : c.padStart(widths[k]))).join('  ');
  return [line(headers), widths.map((w) => '-'.repeat(w)).join('  '), ...cells.map(line)].join('\n') + '\n';
}

/** The phases' figures; with `baseRps`, each phase's requests/s also as a percentage of it. */
export function summaryTable(rows: Summary[], baseRps?: number): string {
  const cpu = rows.some((s) => s.serverCpuUs !== undefined);
  const us = (v: number | undefined) => (v === undefined ? '' : Math.round(v));
  return table(
    ['phase', 'requests', 'req/s', ...(baseRps ? ['% of bare'] : []), 'p50 ms', 'p95 ms', 'p99 ms', 'errors', ...(cpu ? ['server CPU µs/req', 'PostgreSQL CPU µs/req', 'driver CPU µs/req'] : [])],
    rows.map((s) => [s.label, s.requests, s.rps, ...(baseRps ? [(100 * s.rps) / (s.baseRps ?? baseRps)] : []), s.p50, s.p95, s.p99, s.errors, ...(cpu ? [us(s.serverCpuUs), us(s.dbCpuUs), us(s.driverCpuUs)] : [])]),
  );
}
