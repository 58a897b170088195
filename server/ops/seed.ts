import 'reflect-metadata';
import { MikroORM, type EntityManager } from '@mikro-orm/postgresql';
import { logger } from '../logger';
import { ormConfig } from '../mikro-orm.config';
import { loadDemo } from '../../seeds/demo';
import { setting } from '../config';
import { recordSeedOnce } from './seed.queries';

/** Named data sets. Each loads once per database (recorded in seed_history). */
export const SEEDS: Record<string, (em: EntityManager) => Promise<void>> = {
  demo: loadDemo,
};

/** Loads `name` unless already loaded; returns whether it loaded now. */
export async function seed(em: EntityManager, name: string): Promise<boolean> {
  const load = SEEDS[name];
  if (!load) throw new Error(`Unknown data set "${name}". Known: ${Object.keys(SEEDS).join(', ')}`);
  return em.transactional(async (tx) => {
    // The row lock makes two concurrent starts load it once.
    if (!(await recordSeedOnce(tx, name))) return false;
    await load(tx);
    return true;
  });
}

if (require.main === module) {
  const name = process.argv[2] ?? 'demo';
  (async () => {
    const orm = await MikroORM.init(ormConfig(setting('DATABASE_URL')));
    try {
      const loaded = await seed(orm.em.fork(), name);
      logger.info({ dataSet: name }, loaded ? 'demo data loaded' : 'demo data already present');
    } finally {
      await orm.close();
    }
  })().catch((err: unknown) => {
    logger.fatal({ err }, 'loading data failed');
    process.exit(1);
  });
}
