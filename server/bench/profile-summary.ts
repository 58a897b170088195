import fs from 'node:fs';
import path from 'node:path';
import { table } from './support/measure';

/**
 * `node dist/server/bench/profile-summary.js FILE.cpuprofile [--requests N] [--top 25]`: where a
 * process's time went, from a V8 CPU profile (`--cpu-prof`, see BENCH_NODE_ARGS) without a GUI.
 *
 * Prints self time by package (node_modules/NAME, our own files as `tendara:server/…`, Node's own
 * as `node:…`), inclusive time by package (a sample counts once for every package on its stack,
 * so a library's callees are in its figure) and self time by function. With `--requests N` (the
 * requests the process answered while profiled) every figure is also given in µs per request.
 *
 * A bench run profiles one process through several phases. `--spans` lists its busy spans (CPU
 * separated by a second or more of idle: bench:api's 4-second slices) with the route modules seen
 * in each; `--between 12.0-16.1,20.3-24.4` (seconds from the profile's start) then sums only those
 * spans, so one phase's requests can be costed on their own.
 */
interface CallFrame { functionName: string; url: string; lineNumber: number }
interface ProfileNode { id: number; callFrame: CallFrame; children?: number[] }
interface CpuProfile { nodes: ProfileNode[]; samples: number[]; timeDeltas: number[]; startTime: number; endTime: number }

export function packageOf(url: string): string {
  if (!url) return '(native)';
  if (url.startsWith('node:')) return url.split('/')[0];
  const file = url.replace(/^file:\/\//, '');
  const nm = file.lastIndexOf('node_modules/');
  if (nm >= 0) {
    const rest = file.slice(nm + 'node_modules/'.length).split('/');
    return rest[0].startsWith('@') ? `${rest[0]}/${rest[1]}` : rest[0];
  }
  const dist = file.indexOf('/dist/');
  return `tendara:${dist >= 0 ? file.slice(dist + 6) : path.basename(file)}`;
}

/**
 * The parts of a request, by package: time in Node's own code and native code (socket writes,
 * hashing, file writes) is charged to the nearest package up the stack that called it.
 */
const PARTS: [string, RegExp][] = [
  ['session store (express-session, connect-pg-simple), cookie parsing', /^(express-session|connect-pg-simple|cookie|cookie-signature|on-headers|uid-safe|random-bytes|tendara:server\/auth\/session-store\.js)$/],
  ['user lookup (passport)', /^(passport|passport-strategy|passport-local|tendara:server\/auth\/(passport|session-user)\.js)$/],
  ['ORM (MikroORM, knex, tarn)', /^(@mikro-orm\/.*|knex|tarn|dataloader|mikro-orm)$/],
  ['PostgreSQL driver (pg, all queries)', /^(pg|pg-pool|pg-protocol|pg-types|pg-connection-string|postgres-.*|buffer-writer|packet-reader)$/],
  ['request logging (pino, request-log)', /^(tendara:server\/http\/request-log\.js|tendara:server\/logger\.js|@pinojs\/redact|pino|pino-http|pino-std-serializers|sonic-boom|fast-redact|quick-format-unescaped|atomic-sleep|safe-stable-stringify|on-exit-leak-free|thread-stream|get-caller-file)$/],
  ['security headers (helmet)', /^helmet$/],
  ['XSRF and cookies (cookies, xsrf)', /^(tendara:server\/http\/cookies\.js|tendara:server\/http\/xsrf\.js)$/],
  ['rate limiter', /^express-rate-limit$/],
  ['JSON body parser', /^(body-parser|raw-body|iconv-lite|type-is|media-typer|content-type|bytes)$/],
  ['Express and router', /^(express|router|finalhandler|parseurl|path-to-regexp|send|serve-static|accepts|negotiator|mime-types|fresh|etag|vary|encodeurl|escape-html|statuses|depd|merge-descriptors|content-disposition|qs|proxy-addr|forwarded|range-parser)$/],
  ['routes, guard, JSON answer (Tendara)', /^tendara:/],
  ['Node: HTTP, sockets, timers', /^(node:.*|\(native\)|\(anonymous\)|\(program\))$/],
  ['garbage collector', /^\(garbage collector\)$/],
];

export function partOf(pkg: string): string {
  return PARTS.find(([, re]) => re.test(pkg))?.[0] ?? `other: ${pkg}`;
}

export function summarise(profile: CpuProfile): { self: Map<string, number>; inclusive: Map<string, number>; fn: Map<string, number>; charged: Map<string, number>; parts: Map<string, number>; totalUs: number } {
  const byId = new Map(profile.nodes.map((n) => [n.id, n]));
  const parent = new Map<number, number>();
  for (const n of profile.nodes) for (const c of n.children ?? []) parent.set(c, n.id);
  const self = new Map<string, number>();
  const inclusive = new Map<string, number>();
  const fn = new Map<string, number>();
  const charged = new Map<string, number>();
  const parts = new Map<string, number>();
  const add = (m: Map<string, number>, k: string, us: number) => m.set(k, (m.get(k) ?? 0) + us);
  let totalUs = 0;
  profile.samples.forEach((id, k) => {
    // A sample's delta is the time until the next one: the time spent where this one was taken.
    const us = profile.timeDeltas[k + 1] ?? 0;
    const node = byId.get(id)!;
    const name = node.callFrame.functionName || '(anonymous)';
    if (name === '(idle)' || name === '(program)' && !node.callFrame.url) {
      add(self, name, us);
      return;
    }
    totalUs += us;
    add(self, name.startsWith('(') ? name : packageOf(node.callFrame.url), us);
    add(fn, `${name} ${packageOf(node.callFrame.url)}:${node.callFrame.lineNumber + 1}`, us);
    let owner: string | undefined;
    for (let at: number | undefined = id; at !== undefined && !owner; at = parent.get(at)) {
      const f = byId.get(at)!.callFrame;
      const pkg = f.functionName.startsWith('(') && !f.url ? f.functionName : packageOf(f.url);
      if (!/^(node:|\((native|anonymous|program|root)\))/.test(pkg)) owner = pkg;
    }
    owner ??= name === '(garbage collector)' ? name : packageOf(node.callFrame.url);
    add(charged, owner, us);
    add(parts, partOf(owner), us);
    const seen = new Set<string>();
    for (let at: number | undefined = id; at !== undefined; at = parent.get(at)) {
      const f = byId.get(at)!.callFrame;
      if (f.functionName === '(root)') continue;
      const pkg = f.functionName.startsWith('(') ? f.functionName : packageOf(f.url);
      if (!seen.has(pkg)) {
        seen.add(pkg);
        add(inclusive, pkg, us);
      }
    }
  });
  return { self, inclusive, fn, charged, parts, totalUs };
}

/** The time of each sample, in µs from the profile's start. */
function sampleTimes(profile: CpuProfile): number[] {
  let at = 0;
  return profile.timeDeltas.map((d) => (at += d));
}

/** The profile restricted to the samples taken within `windows` (seconds from its start). */
export function within(profile: CpuProfile, windows: Array<[number, number]>): CpuProfile {
  const times = sampleTimes(profile);
  const samples: number[] = [];
  // `summarise` reads sample k's duration from timeDeltas[k + 1]: keep that pairing.
  const timeDeltas = [0];
  profile.samples.forEach((id, k) => {
    if (!windows.some(([from, to]) => times[k] >= from * 1e6 && times[k] < to * 1e6)) return;
    samples.push(id);
    timeDeltas.push(profile.timeDeltas[k + 1] ?? 0);
  });
  return { ...profile, samples, timeDeltas };
}

/**
 * Busy spans: runs of half-seconds in which the main thread was on the CPU a fifth of the time or
 * more (the jobs' polling between bench slices stays below), with the route modules seen most.
 */
function spans(profile: CpuProfile, bucketMs = 500): Array<{ from: number; to: number; cpuMs: number; modules: string[] }> {
  const byId = new Map(profile.nodes.map((n) => [n.id, n]));
  const times = sampleTimes(profile);
  const buckets = new Map<number, { cpuMs: number; modules: Map<string, number> }>();
  profile.samples.forEach((id, k) => {
    const f = byId.get(id)!.callFrame;
    if (f.functionName === '(idle)' || (f.functionName === '(program)' && !f.url)) return;
    const key = Math.floor(times[k] / 1000 / bucketMs);
    const bucket = buckets.get(key) ?? { cpuMs: 0, modules: new Map<string, number>() };
    buckets.set(key, bucket);
    bucket.cpuMs += (profile.timeDeltas[k + 1] ?? 0) / 1000;
    const m = /\/dist\/server\/(services|routes|auth)\/([^/]+)\.js$/.exec(f.url);
    if (m) bucket.modules.set(m[2], (bucket.modules.get(m[2]) ?? 0) + 1);
  });
  const out: Array<{ from: number; to: number; cpuMs: number; modules: Map<string, number> }> = [];
  for (const key of [...buckets.keys()].sort((x, y) => x - y)) {
    const bucket = buckets.get(key)!;
    if (bucket.cpuMs < bucketMs / 5) continue;
    const from = (key * bucketMs) / 1000;
    let span = out[out.length - 1];
    if (!span || span.to < from) out.push((span = { from, to: from, cpuMs: 0, modules: new Map() }));
    span.to = from + bucketMs / 1000;
    span.cpuMs += bucket.cpuMs;
    for (const [name, n] of bucket.modules) span.modules.set(name, (span.modules.get(name) ?? 0) + n);
  }
  return out.map((s) => ({ ...s, modules: [...s.modules.entries()].sort((a, b) => b[1] - a[1]).slice(0, 3).map(([name]) => name) }));
}

function main(): void {
  const args = process.argv.slice(2);
  const file = args.find((a) => !a.startsWith('--') && !/^\d+$/.test(a));
  if (!file) throw new Error('usage: profile-summary FILE.cpuprofile [--requests N] [--top N]');
  const opt = (name: string) => {
    const at = args.indexOf(name);
    return at >= 0 ? Number(args[at + 1]) : undefined;
  };
  const requests = opt('--requests');
  const top = opt('--top') ?? 25;
  let profile = JSON.parse(fs.readFileSync(file, 'utf8')) as CpuProfile;
  if (args.includes('--spans')) {
    process.stdout.write(table(['from s', 'to s', 'CPU ms', 'our modules seen most'],
      spans(profile).map((s) => [s.from.toFixed(1), s.to.toFixed(1), s.cpuMs, s.modules.join(', ')])));
    return;
  }
  const between = args[args.indexOf('--between') + 1];
  if (args.includes('--between') && between) {
    profile = within(profile, between.split(',').map((w) => w.split('-').map(Number) as [number, number]));
  }
  const { self, inclusive, fn, charged, parts, totalUs } = summarise(profile);
  const wall = (profile.endTime - profile.startTime) / 1e6;
  process.stdout.write(`${path.basename(file)}: ${(totalUs / 1e6).toFixed(2)} s on the CPU (main thread) of ${wall.toFixed(1)} s; idle ${((self.get('(idle)') ?? 0) / 1e6).toFixed(2)} s\n`);
  const rows = (m: Map<string, number>, skipIdle: boolean) =>
    [...m.entries()].filter(([k]) => !skipIdle || (k !== '(idle)' && k !== '(program)')).sort((a, b) => b[1] - a[1]).slice(0, top)
      .map(([k, us]) => [k, us / 1000, (100 * us) / totalUs, ...(requests ? [us / requests] : [])]);
  const head = (what: string) => [what, 'ms', '% of CPU', ...(requests ? ['µs/request'] : [])];
  process.stdout.write(`\nBy part of the request (Node's own and native time charged to the nearest package calling it)\n${table(head('part'), rows(parts, true))}`);
  process.stdout.write(`\nBy package, Node's own and native time charged to the nearest package calling it\n${table(head('package'), rows(charged, true))}`);
  process.stdout.write(`\nSelf time by package\n${table(head('package'), rows(self, true))}`);
  process.stdout.write(`\nInclusive time by package (callees included)\n${table(head('package'), rows(inclusive, true))}`);
  process.stdout.write(`\nSelf time by function\n${table(head('function'), rows(fn, false))}`);
}

if (require.main === module) main();
