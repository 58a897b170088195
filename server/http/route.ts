import type { NextFunction, Request, RequestHandler, Response, Router } from 'express';
import type { EntityManager } from '@mikro-orm/postgresql';
import { RequestContext } from '@mikro-orm/core';
import multer from 'multer';
import { z } from 'zod';
import type { Role } from '@shared/roles';
import type { User } from '../entities';
import { userEntity } from '../auth/session-user';
import type { ReadWithSession } from '../auth/session.queries';
import { ForbiddenError, UnauthorizedError } from './errors';
import { parseOr400 } from './validate';

/**
 * A JSON answer already written as text (by PostgreSQL, e.g. the tender list): sent as it is, with
 * the JSON content type, not parsed and serialised again. Its shape is still the route's `response`
 * schema, which a test of the route must check.
 */
export class JsonText {
  constructor(readonly text: string) {}
}

/** Who may call a route: anyone, anyone signed in, or the listed roles. */
export type Access = 'public' | 'signed-in' | readonly Role[];

type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

export interface RouteInput<P, Q, B> {
  params: P;
  query: Q;
  body: B;
  /**
   * The signed-in person (undefined only on public routes) as a User entity of `em`: made from the
   * row read with the session when the handler first reads it (auth/session-user.ts).
   */
  user: User;
  /** This request's own EntityManager (MikroORM RequestContext), forked when first read (http/orm-context.ts). */
  em: EntityManager;
  req: Request;
  res: Response;
}

/**
 * One API route: its documentation, who may call it, the schemas of its input, and the handler.
 * Routes are declared with `route()` in server/routes and collected in one list, from which the
 * Express router, the OpenAPI document and the sign-in/role tests are all derived — so no route can
 * exist without a role check, a schema and documentation.
 */
export interface RouteDef<P = unknown, Q = unknown, B = unknown> {
  method: Method;
  /** Express path below /api, e.g. `/users/:id/deactivate`. */
  path: string;
  summary: string;
  tag: string;
  access: Access;
  params?: z.ZodType<P>;
  query?: z.ZodType<Q>;
  body?: z.ZodType<B>;
  /** Success status; 204 sends no body. */
  status?: number;
  /** Response descriptions for the OpenAPI document, by status. */
  responses?: Record<number, string>;
  /** The shape of the success body, for the OpenAPI document (a zod schema from `shared/`). */
  response?: z.ZodType;
  /** The success body's content type when it is not JSON (exports). */
  produces?: string;
  /**
   * The route changes the session (sign-in, sign-out): it runs through express-session and passport.
   * Every other route reads the session on the lean path, where `req.session` is frozen
   * (auth/session-read.ts). Exact paths only.
   */
  changesSession?: boolean;
  /**
   * A read of a GET route made in the statement that reads the session (one round trip instead of
   * two; auth/session-read.ts): given the valid query and the session id, a `ReadWithSession`. Its
   * row reaches the handler through `rowReadWithSession(req)` once the session, the person and the
   * role check have passed; the handler must still read on its own when there is none. Exact paths only.
   */
  readsWithSession?: (query: Q, sid: string) => ReadWithSession | undefined;
  /**
   * A write made in the statement that reads the session (one round trip instead of two;
   * `writesWithSession` in auth/session-read.ts): given the valid params and body, the request and
   * the session id, a `ReadWithSession` with `writes: true` whose statement writes only when the
   * session's person may make the request (the guard is the statement's: it runs before the role
   * and XSRF checks), or undefined to write in the handler as usual. Its row reaches the handler
   * through `rowReadWithSession(req)`; the handler must still write on its own when there is none.
   * Such a route is mounted before the others.
   */
  writesWithSession?: (input: { params: P; body: B; req: Request }, sid: string) => ReadWithSession | undefined;
  /** A multipart upload of one file in `field` (kept in memory, at most `maxBytes`). */
  upload?: { field: string; maxBytes: number };
  /** Returns the JSON body (or a promise of it), or writes the response itself and returns undefined. */
  handler: (input: RouteInput<P, Q, B>) => unknown;
}

export type AnyRoute = RouteDef<any, any, any>; // eslint-disable-line @typescript-eslint/no-explicit-any -- heterogeneous list

export function route<P = Record<string, never>, Q = Record<string, never>, B = undefined>(
  def: RouteDef<P, Q, B>,
): RouteDef<P, Q, B> {
  return def;
}

/** The one server guard: 401 when signed out, 403 when the role is not allowed; undefined when allowed. */
export function refusal(access: Access, req: Request): UnauthorizedError | ForbiddenError | undefined {
  if (access === 'public') return undefined;
  if (!req.user) return new UnauthorizedError();
  if (access !== 'signed-in' && !access.includes(req.user.role)) return new ForbiddenError();
  return undefined;
}

/** `refusal` as middleware, in front of a route's upload (no file is read for a caller refused). */
export function requireRole(access: Access): RequestHandler {
  return (req: Request, _res: Response, next: NextFunction) => next(refusal(access, req));
}

const contextEm = () => RequestContext.getEntityManager() as EntityManager;

/**
 * A handler's input. `em` and `user` are getters, on the prototype (no closures per request): a
 * handler that reads neither forks no EntityManager and builds no entity.
 */
class Input implements RouteInput<unknown, unknown, unknown> {
  constructor(readonly params: unknown, readonly query: unknown, readonly body: unknown, readonly req: Request, readonly res: Response) {}

  get user(): User {
    return (this.req.user ? userEntity(contextEm(), this.req.user) : undefined) as User;
  }

  get em(): EntityManager {
    return contextEm();
  }
}

/** The params and body a route's `writesWithSession` layer validated, by request, with the route they are for. */
const validatedAhead = new WeakMap<Request, { def: object; params: unknown; body: unknown }>();

/**
 * Keeps the params and body that `writesWithSession`'s layer (auth/session-read.ts) validated for
 * route `def`, so that the route takes them instead of validating the same values again.
 */
export function keepValidated(req: Request, def: object, params: unknown, body: unknown): void {
  validatedAhead.set(req, { def, params, body });
}

/**
 * Mounts every route on `router`: guard → validation → handler, those that write with the session
 * first (`writesWithSession`). A route without an upload is one handler that checks the role first
 * (one router layer less per request); an upload's route checks the role in a layer of its own,
 * before multer reads the file.
 */
export function mountRoutes(router: Router, routes: readonly AnyRoute[]): void {
  // A route that writes with the session first: the request its plan was made for is the one it handles.
  for (const def of [...routes.filter((r) => r.writesWithSession), ...routes.filter((r) => !r.writesWithSession)]) {
    const run = async (req: Request, res: Response) => {
      const ahead = validatedAhead.get(req);
      const kept = ahead?.def === def ? ahead : undefined;
      const input = new Input(
        kept ? kept.params : def.params ? parseOr400(def.params, req.params) : req.params,
        def.query ? parseOr400(def.query, req.query) : {},
        kept ? kept.body : def.body ? parseOr400(def.body, req.body ?? {}) : undefined,
        req,
        res,
      );
      const result = await def.handler(input);
      if (res.headersSent) return;
      const status = def.status ?? 200;
      if (status === 204 || result === undefined) res.status(status === 200 ? 204 : status).end();
      else if (result instanceof JsonText) res.status(status).type('application/json; charset=utf-8').send(result.text);
      else res.status(status).json(result);
    };
    if (def.upload) {
      const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: def.upload.maxBytes, files: 1, fields: 20 } }).single(def.upload.field);
      router[def.method](def.path, requireRole(def.access), upload, run);
    } else {
      router[def.method](def.path, (req: Request, res: Response) => {
        const refused = refusal(def.access, req);
        if (refused) throw refused;
        return run(req, res);
      });
    }
  }
}
