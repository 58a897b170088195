/** `npm run migration:create`: writes a migration from the difference between entities and database. */
import 'reflect-metadata';
import { MikroORM } from '@mikro-orm/postgresql';
import { ormConfig } from '../mikro-orm.config';
import { setting } from '../config';
void (async () => {
  const orm = await MikroORM.init(ormConfig(setting('DATABASE_URL')));
  const r = await orm.getMigrator().createMigration(undefined, false, process.argv[2] === 'initial');
  // A command-line tool: it reports on stdout.
  process.stdout.write(r.fileName ? `Wrote server/migrations/${r.fileName}\n` : 'No changes: the entities match the database.\n');
  await orm.close();
})();
