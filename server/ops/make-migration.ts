import 'reflect-metadata';
import { MikroORM } from '@mikro-orm/postgresql';
import { ormConfig } from '../mikro-orm.config';
(async () => {
  const orm = await MikroORM.init(ormConfig(process.env.DATABASE_URL!));
  const r = await orm.getMigrator().createMigration(undefined, false, process.argv[2] === 'initial');
  console.log(r.fileName);
  console.log(r.code);
  await orm.close();
})();
