import 'reflect-metadata';
import { execFileSync } from 'node:child_process';
import { readdirSync } from 'node:fs';
import { getPriority, setPriority } from 'node:os';
import { MikroORM } from '@mikro-orm/postgresql';
import { closeSolverPool } from './award';
import { loadConfig } from './config';
import { createBoss, startMailWorker, startReminderWorker, startTenderCloseWorker } from './jobs/queue';
import { startSolveWorker } from './jobs/solve-job';
import { startNoticeWorker } from './jobs/notice-job';
import { logger } from './logger';
import { createMailer } from './mail/mailer';
import { ormConfig } from './mikro-orm.config';
import { closeAllDue, closeIfDue } from './services/tender-access';
import { sendDueNotifications } from './services/notifications/reminders';

/**
 * Lowers every thread of this process to `niceness` (Linux keeps a niceness per thread); threads
 * started later (the solver pool's) inherit it from the main thread. Elsewhere, the process. Never
 * raises a priority: a worker started with `nice -n 15` stays there.
 */
function lowerPriority(niceness: number): void {
  let tids: number[];
  try {
    tids = readdirSync('/proc/self/task').map(Number);
  } catch {
    tids = [0];
  }
  for (const tid of tids) {
    try {
      if (getPriority(tid) < niceness) setPriority(tid, niceness);
    } catch {
      // The thread ended meanwhile: nothing to lower.
    }
  }
}

/**
 * Puts every thread of this process in Linux's SCHED_IDLE class (`chrt` from util-linux; threads
 * started later inherit it): they run only on CPU that no normal thread wants, and a web request
 * waking up takes the core from a solve at once, where niceness only gives it a larger share.
 * Measured with `npm run bench:queue`. False where it is not available; the niceness still holds.
 */
function idleClass(): boolean {
  if (process.platform !== 'linux') return false;
  try {
    execFileSync('chrt', ['--idle', '--all-tasks', '--pid', '0', String(process.pid)], { stdio: 'ignore', timeout: 5_000 });
    return true;
  } catch {
    return false;
  }
}

/**
 * `npm run worker`: a process that only takes jobs (solves, mail, closings) from the PostgreSQL
 * queue. Start as many as you like, on any machine that reaches the database (DATABASE_URL).
 */
async function main(): Promise<void> {
  const config = loadConfig();
  lowerPriority(config.workerNice);
  const scheduling = config.workerSched === 'idle' && idleClass() ? 'idle' : 'normal';
  if (scheduling !== config.workerSched) logger.warn('SCHED_IDLE is not available here (chrt failed): the worker runs at its niceness only');
  const orm = await MikroORM.init(ormConfig(config.databaseUrl));
  const boss = createBoss(config.databaseUrl);
  await boss.start();
  const mailer = createMailer(config.smtpUrl, config.mailFrom);
  await startMailWorker(boss, mailer);
  await startTenderCloseWorker(boss, async (id) => {
    const em = orm.em.fork();
    if (id) await closeIfDue(em, id);
    else await closeAllDue(em);
  });
  await startReminderWorker(boss, async () => {
    await sendDueNotifications(orm.em.fork(), { boss, publicUrl: config.publicUrl });
  });
  await startSolveWorker(boss, orm, config.solveConcurrency);
  await startNoticeWorker(boss, orm, mailer);
  logger.info({ pid: process.pid, solveConcurrency: config.solveConcurrency, niceness: config.workerNice, scheduling }, 'worker ready');
  const stop = async (signal: string) => {
    logger.info({ signal }, 'worker stopping');
    await boss.stop({ graceful: true, wait: true, timeout: 10_000 });
    await closeSolverPool();
    mailer.close();
    await orm.close();
    process.exit(0);
  };
  process.once('SIGINT', () => void stop('SIGINT'));
  process.once('SIGTERM', () => void stop('SIGTERM'));
}

main().catch((err: unknown) => {
  logger.fatal({ err }, 'worker could not start');
  process.exit(1);
});
