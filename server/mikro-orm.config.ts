import path from 'node:path';
import { defineConfig } from '@mikro-orm/postgresql';
import { Migrator } from '@mikro-orm/migrations';
import { ENTITIES } from './entities';
import { setting } from './config';

/**
 * MikroORM options. The schema changes only through migrations (server/migrations), never by
 * schema update at run time. Used by the server, the ops scripts, the tests and the CLI
 * (`npx mikro-orm` reads this file through package.json's "mikro-orm" section).
 */
export function ormConfig(databaseUrl: string, options: { debug?: boolean } = {}) {
  // Compiled code lives in dist/server; migrations are compiled .js there and .ts in the source.
  const compiled = __filename.endsWith('.js');
  const migrationsDir = path.join(__dirname, 'migrations');
  // New migrations are written as .ts into the source folder, whichever build runs the command.
  const sourceDir = compiled ? path.join(__dirname, '..', '..', 'server', 'migrations') : migrationsDir;
  return defineConfig({
    clientUrl: databaseUrl,
    entities: ENTITIES,
    extensions: [Migrator],
    debug: options.debug ?? false,
    forceUtcTimezone: true,
    discovery: { disableDynamicFileAccess: true, requireEntitiesArray: true },
    migrations: {
      path: migrationsDir,
      pathTs: sourceDir,
      glob: compiled ? '!(*.d).js' : '!(*.d).ts',
      transactional: true,
      silent: true,
      allOrNothing: true,
      snapshot: false,
      emit: 'ts',
    },
    pool: { min: 0, max: 10 },
    // Tables made by hand in migrations, outside the entities: not MikroORM's to diff or drop.
    schemaGenerator: { skipTables: ['http_session', 'seed_history', 'rate_limit_hit'] },
  });
}

export default ormConfig(setting('DATABASE_URL') || 'postgresql://localhost/tendara');
