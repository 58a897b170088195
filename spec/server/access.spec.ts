import { randomUUID } from 'node:crypto';
import { ROLES, type Role } from '@shared/roles';
import { apiRoutes } from '../../server/app';
import type { AnyRoute } from '../../server/http/route';
import { Browser, makeUser, signedIn, startTestApp, type TestApp } from '../support/app';

/**
 * Every route the API declares (the same list Express mounts) answers 401 when signed out and 403
 * for each role it does not allow — before looking at its input.
 */
let t: TestApp;
let browsers: Record<Role, Browser>;
let routes: AnyRoute[];

beforeAll(async () => {
  t = await startTestApp({ workers: false });
  routes = apiRoutes(t.deps);
  browsers = {} as Record<Role, Browser>;
  for (const role of ROLES) browsers[role] = await signedIn(t, await makeUser(t, role));
});
afterAll(() => t.close());

const concrete = (path: string) => '/api' + path.replace(/:[A-Za-z]+/g, () => randomUUID());

test('the route list is not empty and every route declares who may call it', () => {
  expect(routes.length).toBeGreaterThan(10);
  for (const r of routes) expect(r.access === 'public' || r.access === 'signed-in' || r.access.length > 0).toBe(true);
});

test('public routes are only the sign-in, account-link and API document routes', () => {
  const open = routes.filter((r) => r.access === 'public').map((r) => `${r.method.toUpperCase()} ${r.path}`).sort();
  expect(open).toEqual([
    'DELETE /session', 'GET /account-setup/:token', 'GET /openapi.json', 'GET /session',
    'POST /account-setup/:token', 'POST /session',
  ]);
});

test('signed out, every protected route, whatever its method, answers 401 problem+json', async () => {
  const anonymous = await new Browser(t.app).init();
  const protectedRoutes = routes.filter((x) => x.access !== 'public');
  expect(protectedRoutes.length).toBeGreaterThan(10);
  for (const r of protectedRoutes) {
    const res = r.method === 'get' ? await anonymous.get(concrete(r.path)) : await anonymous.send(r.method, concrete(r.path), {});
    expect({ route: `${r.method} ${r.path}`, status: res.status, type: res.type }).toEqual({
      route: `${r.method} ${r.path}`, status: 401, type: 'application/problem+json',
    });
  }
});

describe('wrong role', () => {
  test.each(ROLES)('every route not allowed to %s answers 403', async (role) => {
    const b = browsers[role];
    const forbidden = routes.filter((r) => Array.isArray(r.access) && !r.access.includes(role));
    expect(forbidden.length).toBeGreaterThan(0);
    for (const r of forbidden) {
      const res = r.method === 'get' ? await b.get(concrete(r.path)) : await b.send(r.method, concrete(r.path), {});
      expect({ route: `${r.method} ${r.path}`, status: res.status, title: res.body.title }).toEqual({
        route: `${r.method} ${r.path}`, status: 403, title: 'Not allowed',
      });
    }
  });
});

test('a state-changing request without the XSRF header is refused with 403, even when signed in', async () => {
  const b = browsers.admin;
  const res = await b.agent.post('/api/users').send({ name: 'X', email: 'x@y.test', role: 'buyer' });
  expect(res.status).toBe(403);
  expect(res.body.title).toBe('Missing XSRF token');
});
