import 'reflect-metadata';
import { MikroORM } from '@mikro-orm/postgresql';
import { logger } from '../logger';
import { ormConfig } from '../mikro-orm.config';
import { createBoss, ensureQueues } from '../jobs/queue';
import { setting } from '../config';

/**
 * Applies pending MikroORM migrations (all in one transaction), then installs or upgrades
 * pg-boss's own tables and creates the queues. Run by `npm start` and `npm test` before the server.
 */
export async function migrate(databaseUrl: string): Promise<string[]> {
  const orm = await MikroORM.init(ormConfig(databaseUrl));
  try {
    const applied = await orm.getMigrator().up();
    const boss = createBoss(databaseUrl, { install: true });
    await boss.start();
    await ensureQueues(boss);
    await boss.stop({ graceful: false, wait: true });
    return applied.map((m) => m.name);
  } finally {
    await orm.close(true);
  }
}

if (require.main === module) {
  const quiet = process.argv.includes('--quiet');
  migrate(setting('DATABASE_URL'))
    .then((names) => {
      if (!quiet) logger.info({ applied: names }, names.length ? 'migrations applied' : 'schema up to date');
    })
    .catch((err: unknown) => {
      logger.fatal({ err }, 'migration failed');
      process.exit(1);
    });
}
