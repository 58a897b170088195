import { z } from 'zod';
import { fieldPath } from '@shared/field-path';

/**
 * Configuration, read and validated once at start-up from the environment.
 * The bootstrap script (server/ops/bootstrap.sh) sets these for `npm start` and `npm test`.
 */
const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('production'),
  HOST: z.string().default('127.0.0.1'),
  PORT: z.coerce.number().int().min(0).max(65535).default(3000),
  DATABASE_URL: z.url({ error: 'DATABASE_URL must be a postgres:// URL' }),
  /** Where outgoing mail goes: the local catcher by default, a real relay in production. */
  SMTP_URL: z.url().default('smtp://127.0.0.1:2525'),
  /** When set, this process also runs the SMTP catcher on that port (npm start and tests). */
  MAIL_CATCHER_PORT: z.coerce.number().int().min(0).max(65535).optional(),
  MAIL_FROM: z.string().default('Tendara <no-reply@tendara.test>'),
  /** Signs session cookies; the web server needs it, a jobs-only worker does not. */
  SESSION_SECRET: z.string().min(32, { error: 'SESSION_SECRET must be at least 32 characters' }).optional(),
  /** The address people use to reach the app; used in e-mailed links. */
  PUBLIC_URL: z.url().optional(),
  /** Set to 1 behind a TLS-terminating proxy: cookies become Secure and the proxy's address is trusted. */
  TRUST_PROXY: z.enum(['0', '1']).default('0'),
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  /** The built Angular app; the server serves it when the folder exists. */
  CLIENT_DIST: z.string().optional(),
  /** Run queue workers (solve and mail jobs) in this process. */
  RUN_WORKERS: z.enum(['0', '1']).default('1'),
  /** Award solves one process runs at once (each uses worker threads of its own). */
  SOLVE_CONCURRENCY: z.coerce.number().int().min(1).max(16).default(1),
  /**
   * Niceness of a jobs-only process (`npm run worker`), 0 to 9: solves are CPU-bound for seconds
   * and should not take the CPU from the requests people wait for. The solver's helper threads
   * step 5 to 10 further down from it (award/workers/low-priority.ts, at most 19), so that
   * below 10 they still give way to the main run.
   */
  WORKER_NICE: z.coerce.number().int().min(0).max(9).default(5),
  /**
   * Scheduling class of a jobs-only process on Linux. `idle` (default): SCHED_IDLE, set with
   * `chrt --idle` on every thread, so the solves only take CPU nothing else wants and the web
   * server and PostgreSQL are never kept waiting by them; `normal`: the usual class at WORKER_NICE.
   */
  WORKER_SCHED: z.enum(['idle', 'normal']).default('idle'),
  /**
   * Show set-password links in the admin's Outbox (1) or mask them (0, the default). Only for a
   * test or demo installation, whose administrator reads the caught mail instead of the people it
   * is addressed to; `npm start` (the demo) turns it on. Off, nobody can take over an account
   * from the Outbox.
   */
  OUTBOX_SHOW_LINKS: z.enum(['0', '1']).default('0'),
  /** Failed sign-ins from one IP address, across every e-mail, per 15 minutes (password spraying). */
  SIGN_IN_IP_LIMIT: z.coerce.number().int().min(1).max(10_000).default(30),
});

export type Config = {
  env: 'development' | 'production' | 'test';
  host: string;
  port: number;
  databaseUrl: string;
  smtpUrl: string;
  mailCatcherPort: number | undefined;
  mailFrom: string;
  sessionSecret: string | undefined;
  publicUrl: string;
  trustProxy: boolean;
  logLevel: string;
  clientDist: string | undefined;
  runWorkers: boolean;
  solveConcurrency: number;
  workerNice: number;
  workerSched: 'idle' | 'normal';
  outboxShowLinks: boolean;
  signInIpLimit: number;
};

/** Reads the environment; throws one error listing every bad variable. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const parsed = envSchema.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${fieldPath(i.path)}: ${i.message}`);
    throw new Error(`Invalid configuration:\n${lines.join('\n')}`);
  }
  const e = parsed.data;
  return {
    env: e.NODE_ENV,
    host: e.HOST,
    port: e.PORT,
    databaseUrl: e.DATABASE_URL,
    smtpUrl: e.SMTP_URL,
    mailCatcherPort: e.MAIL_CATCHER_PORT,
    mailFrom: e.MAIL_FROM,
    sessionSecret: e.SESSION_SECRET,
    publicUrl: (e.PUBLIC_URL ?? `http://${e.HOST}:${e.PORT}`).replace(/\/$/, ''),
    trustProxy: e.TRUST_PROXY === '1',
    logLevel: e.LOG_LEVEL,
    clientDist: e.CLIENT_DIST,
    runWorkers: e.RUN_WORKERS === '1',
    solveConcurrency: e.SOLVE_CONCURRENCY,
    workerNice: e.WORKER_NICE,
    workerSched: e.WORKER_SCHED,
    outboxShowLinks: e.OUTBOX_SHOW_LINKS === '1',
    signInIpLimit: e.SIGN_IN_IP_LIMIT,
  };
}

/**
 * Settings that modules read on their own, outside `Config` (the logger, the queue, the award
 * engine's thread pools, the command-line tools), each validated here when it is read. They are
 * read when used, not at import, so a test can set one for the process it starts.
 */
const settingSchemas = {
  LOG_LEVEL: envSchema.shape.LOG_LEVEL,
  /** How soon the jobs of a worker that died are expired and retried elsewhere (pg-boss maintenance). */
  QUEUE_MAINTENANCE_SECONDS: z.coerce.number().int().min(1).max(3600).default(15),
  /** Seconds between tries of a notice while the mail server is unreachable, and how many tries in all. */
  NOTICE_RETRY_SECONDS: z.coerce.number().int().min(1).max(86_400).default(30),
  NOTICE_RETRY_LIMIT: z.coerce.number().int().min(1).max(10_000).default(240),
  /** Threads of each award solver pool (server/award/workers.ts); at least 2. */
  AWARD_SOLVER_THREADS: z.coerce.number().int().min(2).max(64).default(2),
  /** The database of the command-line tools (migrate, seed, migration:create). */
  DATABASE_URL: z.string().default(''),
  /**
   * The ocid prefix of the open-data export (GET /api/tenders/:id/ocds): `ocds-` and six letters or
   * digits. The Open Contracting Partnership's helpdesk registers one per publisher; the default is a
   * placeholder for the demo, not a registered prefix: a real buyer registers its own and sets it here.
   */
  OCDS_OCID_PREFIX: z.string().regex(/^ocds-[a-z0-9]{6}$/, { error: 'OCDS_OCID_PREFIX must be "ocds-" and six lower-case letters or digits, e.g. ocds-abc123.' }).default('ocds-tdr000'),
  /** Set by npm for `npm run` and `npm start`; the API document's version. */
  npm_package_version: z.string().default('0.1.0'),
} as const;
type Settings = { [K in keyof typeof settingSchemas]: z.output<(typeof settingSchemas)[K]> };

/** One setting from the environment, validated; a bad value throws an error naming the variable. */
export function setting<K extends keyof Settings>(name: K, env: NodeJS.ProcessEnv = process.env): Settings[K] {
  const parsed = settingSchemas[name].safeParse(env[name]);
  if (!parsed.success) throw new Error(`Invalid configuration:\n  ${name}: ${parsed.error.issues.map((i) => i.message).join('; ')}`);
  return parsed.data as Settings[K];
}
