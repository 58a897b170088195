import 'reflect-metadata';
import type { Server } from 'node:http';
import { MikroORM } from '@mikro-orm/postgresql';
import { Pool } from 'pg';
import { createApp } from './app';
import { loadConfig, type Config } from './config';
import { closeSolverPool } from './award';
import { closeWorkbookPool } from './workbooks/workbook-pool';
import { createBoss, startMailWorker, startReminderWorker, startTenderCloseWorker } from './jobs/queue';
import { startSolveWorker } from './jobs/solve-job';
import { startNoticeWorker } from './jobs/notice-job';
import { closeAllDue, closeIfDue } from './services/tender-access';
import { sendDueNotifications } from './services/notifications/reminders';
import { logger } from './logger';
import { startMailCatcher, type MailCatcher } from './mail/catcher';
import { createMailer } from './mail/mailer';
import { ormConfig } from './mikro-orm.config';
import { SESSION_POOL_OPTIONS } from './context';
import { DEMO_PASSWORD, DEMO_SIGN_INS } from '../seeds/demo-people';

export interface Running {
  url: string;
  stop(): Promise<void>;
}

/** Starts the whole server: database, queue, mail catcher (when asked), workers and HTTP. */
export async function start(config: Config): Promise<Running> {
  const orm = await MikroORM.init(ormConfig(config.databaseUrl));
  const pending = await orm.getMigrator().getPendingMigrations();
  if (pending.length) {
    await orm.close();
    throw new Error(`The database needs ${pending.length} migration(s): run node dist/server/ops/migrate.js (npm start does).`);
  }
  // The session store, the sign-in limits and the tender lists (prepared statements, see services/queries).
  const sessionPool = new Pool({ connectionString: config.databaseUrl, max: 10, options: SESSION_POOL_OPTIONS });
  const boss = createBoss(config.databaseUrl);
  await boss.start();
  let catcher: MailCatcher | undefined;
  if (config.mailCatcherPort !== undefined) catcher = await startMailCatcher(orm, config.mailCatcherPort);
  const mailer = createMailer(config.smtpUrl, config.mailFrom);
  if (config.runWorkers) {
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
  }

  const app = createApp({ config, orm, boss, sessionPool });
  const server: Server = await new Promise((resolve, reject) => {
    const s = app.listen(config.port, config.host, () => resolve(s));
    s.once('error', reject);
  });
  const address = server.address();
  const port = typeof address === 'object' && address ? address.port : config.port;
  const url = `http://${config.host}:${port}`;
  logger.info({ url }, 'Tendara is listening');

  let stopping: Promise<void> | undefined;
  return {
    url,
    stop: () =>
      (stopping ??= (async () => {
        server.closeIdleConnections();
        await new Promise<void>((resolve) => server.close(() => resolve()));
        await boss.stop({ graceful: true, wait: true, timeout: 10_000 });
        await closeSolverPool();
        await closeWorkbookPool();
        await catcher?.close();
        mailer.close();
        await sessionPool.end();
        await orm.close();
      })()),
  };
}

function banner(url: string): void {
  const lines = [
    '',
    `  Tendara is running at ${url}`,
    '',
    `  Demo sign-ins (demo data only), password ${DEMO_PASSWORD}:`,
    ...DEMO_SIGN_INS.map((s) => `    ${s.email.padEnd(34)} ${s.role}`),
    '',
    '  Mail sent by the app is caught locally: sign in as admin and open Outbox.',
    '  Press Ctrl-C to stop.',
    '',
  ];
  process.stdout.write(lines.join('\n') + '\n');
}

if (require.main === module) {
  const config = loadConfig();
  start(config)
    .then((running) => {
      if (process.argv.includes('--banner')) banner(config.publicUrl === `http://${config.host}:${config.port}` ? running.url : config.publicUrl);
      const shutdown = (signal: string) => {
        logger.info({ signal }, 'stopping');
        running.stop().then(
          () => process.exit(0),
          (err: unknown) => {
            logger.error({ err }, 'unclean stop');
            process.exit(1);
          },
        );
      };
      process.once('SIGINT', () => shutdown('SIGINT'));
      process.once('SIGTERM', () => shutdown('SIGTERM'));
    })
    .catch((err: unknown) => {
      logger.fatal({ err }, 'Tendara could not start');
      process.exit(1);
    });
}
