import { AsyncLocalStorage } from 'node:async_hooks';
import { RequestContext, type EntityManager } from '@mikro-orm/core';
import type { RequestHandler } from 'express';

/**
 * A request's EntityManagers, made the first time one is asked for: a request whose route never
 * touches the ORM (the session, the tender lists, which use the pg pool) forks nothing. Forking the
 * EntityManager (a unit of work, an identity map, its own options) on every API request was a
 * measurable share of `GET /api/session` (bench:api, phase d).
 */
class LazyForks extends Map<string, EntityManager> {
  /** While forking: `fork` itself asks for the context's EntityManager, which is not there yet. */
  private forking = false;

  constructor(private readonly root: EntityManager) {
    super();
  }

  override get(name: string): EntityManager | undefined {
    const made = super.get(name);
    if (made || this.forking || name !== this.root.name) return made;
    this.forking = true;
    try {
      // As RequestContext.create forks (MikroORM 6.6.16, utils/RequestContext.js), outside the context.
      const fork = this.root.fork({ useContext: true });
      this.set(name, fork);
      return fork;
    } finally {
      this.forking = false;
    }
  }
}

/**
 * MikroORM's own store of request contexts (private in its types; `RequestContext.getEntityManager`
 * reads it). `RequestContext.create` forks at once, so the context is entered here with lazy forks.
 */
const storage = (RequestContext as unknown as { storage?: unknown }).storage;

/** Express middleware: this request's MikroORM RequestContext, its EntityManager forked on first use. */
export function lazyRequestContext(root: EntityManager): RequestHandler {
  if (!(storage instanceof AsyncLocalStorage)) throw new Error('MikroORM RequestContext has no AsyncLocalStorage named storage: check lazyRequestContext against the installed version.');
  const contexts = storage as AsyncLocalStorage<RequestContext>;
  return (_req, _res, next) => contexts.run(new RequestContext(new LazyForks(root)), next);
}
