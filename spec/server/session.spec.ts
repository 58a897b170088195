import express from 'express';
import helmet from 'helmet';
import request from 'supertest';
import { SESSION_COOKIE } from '../../server/context';
import { helmetOptions } from '../../server/http/security-headers';
import { Browser, makeUser, startTestApp, TEST_PASSWORD, type TestApp } from '../support/app';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({ workers: false });
});
afterAll(() => t.close());

test('GET /api/session when signed out answers 401 problem+json and sets the XSRF-TOKEN cookie', async () => {
  const res = await new Browser(t.app).agent.get('/api/session');
  expect(res.status).toBe(401);
  expect(res.type).toBe('application/problem+json');
  expect(res.body).toMatchObject({ status: 401, title: 'Not signed in' });
  const cookies = ([] as string[]).concat(res.headers['set-cookie'] ?? []);
  expect(cookies.some((c) => /^XSRF-TOKEN=[A-Za-z0-9_-]{32,};/.test(c) && !/HttpOnly/i.test(c))).toBe(true);
});

test('sign-in without the XSRF header is refused with 403', async () => {
  const user = await makeUser(t, 'buyer');
  const b = await new Browser(t.app).init();
  const res = await b.agent.post('/api/session').send({ email: user.email, password: TEST_PASSWORD });
  expect(res.status).toBe(403);
});

test('sign-in, session and sign-out: the cookie is httpOnly and SameSite=Lax; the e-mail is matched regardless of case', async () => {
  const user = await makeUser(t, 'compliance');
  const b = await new Browser(t.app).init();
  const res = await b.signIn(user.email.toUpperCase());
  expect(res.status).toBe(200);
  expect(res.body.user).toEqual({ id: user.id, email: user.email, name: user.name, role: 'compliance', vendorOrganisation: null });
  const cookie = ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((c) => c.startsWith(`${SESSION_COOKIE}=`));
  expect(cookie).toMatch(/HttpOnly/i);
  expect(cookie).toMatch(/SameSite=Lax/i);
  expect((await b.get('/api/session')).body.user.id).toBe(user.id);
  expect((await b.send('delete', '/api/session')).status).toBe(204);
  expect((await b.get('/api/session')).status).toBe(401);
});

test('an unknown e-mail and a wrong password get the same 401 answer', async () => {
  const user = await makeUser(t, 'buyer');
  const b = await new Browser(t.app).init();
  const unknown = await b.signIn('nobody@nowhere.test', 'whatever-password');
  const wrong = await b.signIn(user.email, 'not-the-password');
  expect(unknown.status).toBe(401);
  expect(wrong.status).toBe(401);
  expect(unknown.body).toEqual(wrong.body);
  expect(unknown.body).toEqual({ type: 'about:blank', title: 'Sign-in failed', status: 401, detail: 'E-mail or password is not correct.' });
});

test('a deactivated person cannot sign in, with the same answer as a wrong password', async () => {
  const user = await makeUser(t, 'buyer', { active: false });
  const res = await (await new Browser(t.app).init()).signIn(user.email);
  expect(res.status).toBe(401);
  expect(res.body.detail).toBe('E-mail or password is not correct.');
});

test('after 10 failed sign-ins for one e-mail the next is refused with 429, even with the right password', async () => {
  const user = await makeUser(t, 'buyer');
  const b = await new Browser(t.app).init();
  for (let i = 0; i < 10; i++) expect((await b.signIn(user.email, 'wrong-password-x')).status).toBe(401);
  const res = await b.signIn(user.email);
  expect(res.status).toBe(429);
  expect(res.body.title).toBe('Too many attempts');
});

test('a sign-in body with wrong types or over-long strings is refused with 400 naming the field', async () => {
  const b = await new Browser(t.app).init();
  const res = await b.post('/api/session', { email: 42, password: 'x'.repeat(500) });
  expect(res.status).toBe(400);
  expect(res.body.errors.map((e: { field: string }) => e.field).sort()).toEqual(['email', 'password']);
});

test('malformed JSON gets a 400 that says so', async () => {
  const b = await new Browser(t.app).init();
  const res = await b.agent.post('/api/session').set('X-XSRF-TOKEN', b.token).set('Content-Type', 'application/json').send('{"email": ');
  expect(res.status).toBe(400);
  expect(res.body.title).toBe('Malformed JSON');
});

test('security headers are set (helmet): CSP, nosniff, frame options', async () => {
  const res = await new Browser(t.app).agent.get('/api/session');
  expect(res.headers['content-security-policy']).toContain("script-src 'self'");
  expect(res.headers['x-content-type-options']).toBe('nosniff');
  expect(res.headers['x-frame-options']).toBe('SAMEORIGIN');
  expect(res.headers['x-powered-by']).toBeUndefined();
});

test("the security headers computed once at start are helmet's own, name for name and value for value, with and without a TLS proxy", async () => {
  const HELMET_HEADERS = [
    'content-security-policy', 'cross-origin-opener-policy', 'cross-origin-resource-policy', 'origin-agent-cluster', 'referrer-policy',
    'strict-transport-security', 'x-content-type-options', 'x-dns-prefetch-control', 'x-download-options', 'x-frame-options',
    'x-permitted-cross-domain-policies', 'x-xss-protection', 'x-powered-by',
  ];
  const pick = (headers: Record<string, unknown>) => Object.fromEntries(HELMET_HEADERS.filter((h) => headers[h] !== undefined).map((h) => [h, headers[h]]));
  for (const trustProxy of [false, true]) {
    const proxied = trustProxy ? await startTestApp({ workers: false, env: { TRUST_PROXY: '1' } }) : t;
    try {
      const bare = express();
      bare.use(helmet(helmetOptions(trustProxy)));
      bare.get('/api/session', (_req, res) => res.send('ok'));
      const expected = pick((await request(bare).get('/api/session')).headers);
      const actual = pick((await new Browser(proxied.app).agent.get('/api/session')).headers);
      // helmet sets eleven headers here (twelve with HSTS behind a TLS proxy).
      expect(Object.keys(expected)).toHaveLength(trustProxy ? 12 : 11);
      expect(actual).toEqual(expected);
    } finally {
      if (proxied !== t) await proxied.close();
    }
  }
});

test('an API answer is no-store and carries no ETag (nothing may keep it, so nothing revalidates it)', async () => {
  const res = await new Browser(t.app).agent.get('/api/openapi.json');
  expect(res.status).toBe(200);
  expect(res.headers['cache-control']).toBe('no-store');
  expect(res.headers.etag).toBeUndefined();
});

test('an unknown API path is a 404 problem, never the client app', async () => {
  const res = await new Browser(t.app).agent.get('/api/no-such-thing');
  expect(res.status).toBe(404);
  expect(res.type).toBe('application/problem+json');
});

test("every answer names its request: the caller's X-Request-Id (cut to 64 characters), else a new UUID", async () => {
  const given = await new Browser(t.app).agent.get('/api/session').set('X-Request-Id', `trace-${'x'.repeat(80)}`);
  expect(given.headers['x-request-id']).toBe(`trace-${'x'.repeat(58)}`);
  const fresh = await new Browser(t.app).agent.get('/api/session');
  expect(fresh.headers['x-request-id']).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
});
