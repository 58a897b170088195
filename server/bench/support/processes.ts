import { spawn, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import net from 'node:net';
import path from 'node:path';

/** The server and worker processes a benchmark measures, each a real `node dist/server/…` process. */
export interface Proc {
  name: string;
  child: ChildProcess;
  /** Its log file, and the size the file had when this process started (logs of a name append). */
  logFile: string;
  logStart: number;
  stop(): Promise<void>;
}

const running = new Set<Proc>();
const DIST = path.resolve(__dirname, '..', '..');

export function benchEnv(): { databaseUrl: string; dir: string } {
  const databaseUrl = process.env['DATABASE_URL'];
  const dir = process.env['BENCH_DIR'];
  if (!databaseUrl || !dir) throw new Error('DATABASE_URL and BENCH_DIR are not set: run the benchmark through npm run bench:api or bench:queue.');
  return { databaseUrl, dir };
}

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(port));
    });
  });
}

/** A session secret of this run only. */
export const SESSION_SECRET = randomBytes(32).toString('hex');

function launch(name: string, script: string, env: Record<string, string>): Proc {
  const { databaseUrl, dir } = benchEnv();
  // The JSON log lines go to a file in the throwaway folder: logging stays on, as in production.
  const logFile = path.join(dir, `${name}.log`);
  const log = fs.openSync(logFile, 'a');
  const logStart = fs.fstatSync(log).size;
  // BENCH_NODE_ARGS passes flags to the measured processes, e.g. "--cpu-prof --cpu-prof-dir=/tmp/prof"
  // to see where their time goes (NODE_OPTIONS refuses --cpu-prof).
  const nodeArgs = (process.env['BENCH_NODE_ARGS'] ?? '').split(' ').filter(Boolean);
  const child = spawn(process.execPath, [...nodeArgs, path.join(DIST, script)], {
    env: { ...process.env, NODE_ENV: 'production', LOG_LEVEL: 'info', DATABASE_URL: databaseUrl, SESSION_SECRET, ...env },
    stdio: ['ignore', log, log],
  });
  fs.closeSync(log);
  const proc: Proc = {
    name,
    child,
    logFile,
    logStart,
    stop: () =>
      new Promise<void>((resolve) => {
        running.delete(proc);
        if (child.exitCode !== null || child.signalCode !== null) return resolve();
        const force = setTimeout(() => child.kill('SIGKILL'), 15_000);
        child.once('exit', () => {
          clearTimeout(force);
          resolve();
        });
        child.kill('SIGTERM');
      }),
  };
  running.add(proc);
  child.once('exit', (code, signal) => {
    if (running.has(proc)) {
      running.delete(proc);
      process.stderr.write(`[bench] ${name} exited unexpectedly (${signal ?? code}); its log: ${path.join(dir, `${name}.log`)}\n`);
    }
  });
  return proc;
}

/**
 * Starts `node dist/server/main.js` on a free port and waits until it answers. It runs the mail
 * catcher, unless `smtpUrl` names another process's: then it only serves (bench:api measures a web
 * process that does nothing else; its mail goes to a catcher in a process of its own).
 */
export async function startServer(
  env: Record<string, string> = {}, options: { name?: string; smtpUrl?: string } = {},
): Promise<{ proc: Proc; url: string; smtpUrl: string }> {
  const port = await freePort();
  const mailPort = options.smtpUrl === undefined ? await freePort() : undefined;
  const smtpUrl = options.smtpUrl ?? `smtp://127.0.0.1:${mailPort}`;
  const proc = launch(options.name ?? 'server', 'main.js', {
    HOST: '127.0.0.1', PORT: String(port), ...(mailPort === undefined ? {} : { MAIL_CATCHER_PORT: String(mailPort) }), SMTP_URL: smtpUrl, ...env,
  });
  const url = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 60_000;
  for (;;) {
    if (proc.child.exitCode !== null) throw new Error(`the server did not start; see ${benchEnv().dir}/server.log`);
    try {
      const res = await fetch(`${url}/api/session`);
      if (res.status === 401) return { proc, url, smtpUrl };
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error('the server did not answer within 60 s');
    await new Promise((r) => setTimeout(r, 250));
  }
}

/**
 * Starts the bare Express 5 yardstick (`node dist/server/bench/bare-server.js`: one route, no
 * middleware) on a free port, the same way as the server, and waits until it answers.
 */
export async function startBare(): Promise<{ proc: Proc; url: string }> {
  const port = await freePort();
  const proc = launch('bare-express', 'bench/bare-server.js', { HOST: '127.0.0.1', PORT: String(port) });
  const url = `http://127.0.0.1:${port}`;
  await waitForLog(proc, 'bare express listening');
  return { proc, url };
}

/** Starts `node dist/server/worker.js` (jobs only). */
export function startWorker(n: number, env: Record<string, string> = {}): Proc {
  return launch(`worker-${n}`, 'worker.js', { SOLVE_CONCURRENCY: '1', ...env });
}

/** Waits until the process has logged `message` (e.g. 'worker ready'); fails if it exits or takes too long. */
export async function waitForLog(proc: Proc, message: string, timeoutMs = 60_000): Promise<void> {
  const needle = `"msg":${JSON.stringify(message)}`;
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const text = fs.readFileSync(proc.logFile).subarray(proc.logStart).toString('utf8');
    if (text.includes(needle)) return;
    if (proc.child.exitCode !== null) throw new Error(`${proc.name} exited before logging "${message}"; see ${proc.logFile}`);
    if (Date.now() > deadline) throw new Error(`${proc.name} did not log "${message}" within ${timeoutMs / 1000} s; see ${proc.logFile}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

export async function stopAll(): Promise<void> {
  await Promise.all([...running].map((p) => p.stop()));
}

// Never leave a server or worker behind: Ctrl-C, kill or a crash of the benchmark stops them.
process.once('exit', () => {
  for (const p of running) p.child.kill('SIGKILL');
});
for (const signal of ['SIGINT', 'SIGTERM'] as const) {
  process.once(signal, () => {
    void stopAll().finally(() => process.exit(130));
  });
}
