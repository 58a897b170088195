import PgBoss from 'pg-boss';
import { logger } from '../logger';
import type { Mailer, OutgoingMail } from '../mail/mailer';
import { setting } from '../config';

/** Queue names. Jobs live in PostgreSQL (pg-boss), so workers on other machines can share them. */
export const QUEUES = {
  mail: 'mail-send',
  /** Closes a tender at its closing time (reads also close a tender that is due). */
  tenderClose: 'tender-close',
  /** Award engine runs. */
  solve: 'award-solve',
  /** Award and regret letters, one job per notice. */
  notice: 'notice-send',
  /** Closing reminders and standstill ends, every minute (notifications sent once each). */
  reminders: 'notification-reminders',
} as const;

/** pg-boss keeps its tables in this schema, installed by `server/ops/migrate.ts`. */
export const BOSS_SCHEMA = 'pgboss';

/**
 * A pg-boss instance. Only `server/ops/migrate.ts` passes `install: true`: the app itself never
 * changes a schema at run time.
 */
export function createBoss(databaseUrl: string, options: { install?: boolean } = {}): PgBoss {
  const boss = new PgBoss({
    connectionString: databaseUrl,
    schema: BOSS_SCHEMA,
    max: 4,
    migrate: options.install ?? false,
    supervise: !options.install,
    schedule: !options.install,
    // How soon the jobs of a worker that died are expired and retried elsewhere.
    maintenanceIntervalSeconds: setting('QUEUE_MAINTENANCE_SECONDS'),
  });
  boss.on('error', (err) => logger.error({ err }, 'job queue error'));
  return boss;
}

/** Creates the queues (idempotent). */
export async function ensureQueues(boss: PgBoss): Promise<void> {
  for (const name of Object.values(QUEUES)) {
    if (!(await boss.getQueue(name))) {
      await boss.createQueue(name, { name, retryLimit: 8, retryDelay: 15, retryBackoff: true, expireInSeconds: 120 });
    }
  }
}

/** Queues one e-mail; the mail worker sends it, retrying while the SMTP server is unreachable. */
/**
 * Mail a person is waiting on (bid receipts, invitations, account links) goes before notifications
 * (reminders, updates: `notifyOnce`, priority 0): at a deadline rush the 2-hour closing reminders to
 * every invited vendor must not hold up the receipts of the bids arriving (bench:api rush).
 */
export const WAITED_MAIL_PRIORITY = 10;

/** `db`: queue it on that connection instead (pg-boss `send`'s `db` option), e.g. inside the caller's transaction. */
export async function enqueueMail(boss: PgBoss, mail: OutgoingMail, key?: string, db?: PgBoss.Db): Promise<string | null> {
  return boss.send(QUEUES.mail, mail, { priority: WAITED_MAIL_PRIORITY, ...(key ? { singletonKey: key } : {}), ...(db ? { db } : {}) });
}

export async function startMailWorker(boss: PgBoss, mailer: Mailer): Promise<void> {
  await boss.work<OutgoingMail>(QUEUES.mail, { batchSize: 5, pollingIntervalSeconds: 1 }, async (jobs) => {
    for (const job of jobs) {
      await mailer.send(job.data);
      logger.info({ jobId: job.id, to: job.data.to, subject: job.data.subject }, 'mail sent');
    }
  });
}

/** Closes tenders at their closing time; also sweeps any that were missed while no worker ran. */
export async function startTenderCloseWorker(boss: PgBoss, close: (tenderId: string | null) => Promise<void>): Promise<void> {
  await boss.work<{ tenderId: string | null }>(QUEUES.tenderClose, { pollingIntervalSeconds: 2 }, async (jobs) => {
    for (const job of jobs) await close(job.data.tenderId);
  });
  // A sweep every minute as well: tenders seeded or published while no worker ran still close.
  await boss.schedule(QUEUES.tenderClose, '* * * * *', { tenderId: null });
  await close(null);
}

/** Seconds between tries while the mail server is unreachable, and how many tries in all. */
export const noticeRetrySeconds = () => setting('NOTICE_RETRY_SECONDS');
export const noticeRetryLimit = () => setting('NOTICE_RETRY_LIMIT');

/** Queues the sending of one notice (server/jobs/notice-job.ts), now or after `delaySeconds`. */
export async function queueNotice(boss: PgBoss, noticeId: string, delaySeconds = 0): Promise<void> {
  await boss.send(QUEUES.notice, { noticeId }, { startAfter: delaySeconds, retryLimit: 3, retryDelay: noticeRetrySeconds(), expireInSeconds: 120 });
}

/**
 * Seconds before the explanation job of a dead worker is handed to another: it re-solves many
 * times, and a live job past this is handed out again too (and starts over), so it is long.
 */
const EXPLAIN_EXPIRE_SECONDS = 6 * 3600;

/** Queues the explanation of a run on the solve queue (server/jobs/explain-job.ts), so it shares the solve workers. */
export async function queueExplanation(boss: PgBoss, runId: string): Promise<void> {
  await boss.send(QUEUES.solve, { runId, explain: true }, { retryLimit: 2, retryDelay: 5, expireInSeconds: EXPLAIN_EXPIRE_SECONDS });
}

/**
 * Closing reminders and the standstill's end (server/services/notifications/reminders.ts): a pass
 * every minute, beside the close sweep. Each notification goes once (the `notification_sent` key),
 * so passes on several workers, or a pass repeated after a crash, send nothing twice.
 */
export async function startReminderWorker(boss: PgBoss, pass: () => Promise<void>): Promise<void> {
  await boss.work(QUEUES.reminders, { pollingIntervalSeconds: 5 }, async () => {
    await pass();
  });
  await boss.schedule(QUEUES.reminders, '* * * * *', {});
}

/** Queues one vendor's debrief of a run on the solve queue (server/jobs/explain-job.ts `debriefRun`). */
export async function queueDebrief(boss: PgBoss, runId: string, vendorId: string): Promise<void> {
  await boss.send(QUEUES.solve, { runId, debriefVendor: vendorId }, { retryLimit: 2, retryDelay: 5, expireInSeconds: EXPLAIN_EXPIRE_SECONDS });
}

/** One region of an explanation worked out exactly (server/jobs/explain-job.ts `regionCheckRun`). */
export async function queueRegionCheck(boss: PgBoss, runId: string, region: string): Promise<void> {
  await boss.send(QUEUES.solve, { runId, exactRegion: region }, { retryLimit: 2, retryDelay: 5, expireInSeconds: EXPLAIN_EXPIRE_SECONDS });
}
