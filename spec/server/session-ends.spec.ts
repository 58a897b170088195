import { createHmac } from 'node:crypto';
import { SESSION_COOKIE } from '../../server/context';
import { unsignSessionCookie, VerifiedCookies } from '../../server/auth/session-read';
import { TOUCH_EVERY_MS } from '../../server/auth/session-store';
import { Browser, makeUser, signedIn, startTestApp, TEST_PASSWORD, type TestApp } from '../support/app';

/**
 * A signed-in request reads its session and its person in one query and writes the session back
 * at most once a minute. None of that may keep a session alive that was ended, nor a person's
 * old role or status: every change below takes effect on the very next request.
 */
let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({ workers: false });
});
afterAll(() => t.close());

const sql = <T = Record<string, unknown>>(query: string, params: unknown[] = []) => t.em().getConnection().execute<T[]>(query, params);
const sessionsOf = async (userId: string) =>
  (await sql<{ sid: string; expire_ms: string }>(`select sid, extract(epoch from expire) * 1000 as expire_ms from http_session where sess #>> '{passport,user}' = ?`, [userId]))
    .map((r) => ({ sid: r.sid, expireMs: Number(r.expire_ms) }));

/** The session cookie an answer sets, whole (`name=value; Expires=…; …`), if it sets one. */
const sessionCookieOf = (res: { headers: Record<string, unknown> }) =>
  ([] as string[]).concat((res.headers['set-cookie'] as string[] | undefined) ?? []).find((c) => c.startsWith(`${SESSION_COOKIE}=`));

test('after sign-out the very next request is 401, also when the old session cookie is sent again', async () => {
  const user = await makeUser(t, 'buyer');
  const b = await new Browser(t.app).init();
  const signIn = await b.signIn(user.email);
  expect(signIn.status).toBe(200);
  const old = sessionCookieOf(signIn)!.split(';')[0];
  expect((await b.send('delete', '/api/session')).status).toBe(204);
  expect((await b.get('/api/session')).status).toBe(401);
  expect((await new Browser(t.app).agent.get('/api/session').set('Cookie', old)).status).toBe(401);
});

test('after deactivation the very next request is 401, even if the session row were left behind', async () => {
  const user = await makeUser(t, 'buyer');
  const b = await signedIn(t, user);
  expect((await b.get('/api/tenders')).status).toBe(200);
  // Behind the API's back: the person is inactive but their session row is still there.
  await sql(`update app_user set active = false where id = ?`, [user.id]);
  expect(await sessionsOf(user.id)).toHaveLength(1);
  expect((await b.get('/api/tenders')).status).toBe(401);
  expect((await b.get('/api/session')).status).toBe(401);
});

test("a vendor whose place in its firm is no longer approved is 401 on the very next request, even with its session row left behind", async () => {
  const user = await makeUser(t, 'vendor');
  const b = await signedIn(t, user);
  expect((await b.get('/api/tenders')).status).toBe(200);
  // Behind the API's back: the firm's approval is gone but the session row is still there.
  await sql(`update app_user set membership = 'pending' where id = ?`, [user.id]);
  expect(await sessionsOf(user.id)).toHaveLength(1);
  expect((await b.get('/api/tenders')).status).toBe(401);
});

test('a session deleted from the store (as a password reset does to every other session) ends on its very next request', async () => {
  const user = await makeUser(t, 'vendor');
  const first = await signedIn(t, user);
  const second = await signedIn(t, user);
  // Both sessions were just used, so neither is due to be touched: nothing is cached past the store.
  expect((await first.get('/api/session')).status).toBe(200);
  expect((await second.get('/api/session')).status).toBe(200);
  const sid = (await sessionsOf(user.id)).map((s) => s.sid);
  expect(sid).toHaveLength(2);
  await sql(`delete from http_session where sid = ?`, [sid[0]]);
  const answers = [(await first.get('/api/session')).status, (await second.get('/api/session')).status].sort();
  expect(answers).toEqual([200, 401]);
  // And the ended one stays ended: a later request does not bring its row back.
  expect(await sessionsOf(user.id)).toHaveLength(1);
});

test('a role change takes effect on the very next request: no stale role is kept with the session', async () => {
  const user = await makeUser(t, 'buyer');
  const b = await signedIn(t, user);
  expect((await b.get('/api/session')).body.user.role).toBe('buyer');
  await sql(`update app_user set role = 'compliance' where id = ?`, [user.id]);
  expect((await b.get('/api/session')).body.user.role).toBe('compliance');
  // A buyer-only route now refuses.
  const res = await b.post('/api/tenders', {});
  expect(res.status).toBe(403);
});

test('a session past its expiry in the store is 401', async () => {
  const user = await makeUser(t, 'buyer');
  const b = await signedIn(t, user);
  await sql(`update http_session set expire = now() - interval '1 second' where sess #>> '{passport,user}' = ?`, [user.id]);
  expect((await b.get('/api/session')).status).toBe(401);
});

test('a signed-in request writes the session back at most once a minute, and moves its expiry when that is due', async () => {
  const user = await makeUser(t, 'buyer');
  const b = await signedIn(t, user);
  const [signedInRow] = await sessionsOf(user.id);
  for (let k = 0; k < 3; k++) {
    const res = await b.get('/api/session');
    expect(res.status).toBe(200);
    // Nothing moved, so the cookie is not sent again either.
    expect(sessionCookieOf(res)).toBeUndefined();
  }
  const [unchanged] = await sessionsOf(user.id);
  expect(unchanged.expireMs).toBe(signedInRow.expireMs);
  // As if the last write was longer ago than the throttle: the next request moves the expiry on.
  await sql(`update http_session set expire = expire - make_interval(secs => ?) where sid = ?`, [(2 * TOUCH_EVERY_MS) / 1000, signedInRow.sid]);
  const [aged] = await sessionsOf(user.id);
  const due = await b.get('/api/session');
  expect(due.status).toBe(200);
  const [touched] = await sessionsOf(user.id);
  expect(touched.expireMs).toBeGreaterThanOrEqual(aged.expireMs + TOUCH_EVERY_MS);
  // …and the browser gets the cookie again, expiring with the stored session (HTTP dates have whole seconds).
  const slid = sessionCookieOf(due);
  const expires = Date.parse(/Expires=([^;]+)/i.exec(slid ?? '')?.[1] ?? '');
  expect(Math.abs(expires - touched.expireMs)).toBeLessThan(2000);
  expect(slid).toMatch(/HttpOnly/i);
  expect(slid).toMatch(/SameSite=Lax/i);
  // The same session as before: the cookie it names still works on its own.
  const again = await new Browser(t.app).agent.get('/api/session').set('Cookie', slid!.split(';')[0]);
  expect(again.body.user?.id).toBe(user.id);
});

/** A session cookie for `sid` signed with `secret` as express-session signs it (HMAC-SHA-256, base64 without padding). */
const signedCookie = (sid: string, secret: string) => `${SESSION_COOKIE}=${encodeURIComponent(`s:${sid}.${createHmac('sha256', secret).update(sid).digest('base64').replace(/=+$/, '')}`)}`;

test('a forged or tampered session cookie is 401: another secret, a changed signature or id, no signature', async () => {
  const user = await makeUser(t, 'buyer');
  await signedIn(t, user);
  const [{ sid }] = await sessionsOf(user.id);
  const status = async (cookie: string) => (await new Browser(t.app).agent.get('/api/session').set('Cookie', cookie)).status;
  // The cookie made here with the server's secret is accepted: the refusals below are of the forgeries alone.
  expect(await status(signedCookie(sid, t.config.sessionSecret!))).toBe(200);
  expect(await status(signedCookie(sid, `${t.config.sessionSecret!}x`))).toBe(401);
  const good = decodeURIComponent(signedCookie(sid, t.config.sessionSecret!).split('=').slice(1).join('='));
  const flipped = good.slice(0, -1) + (good.endsWith('A') ? 'B' : 'A');
  expect(await status(`${SESSION_COOKIE}=${encodeURIComponent(flipped)}`)).toBe(401);
  const otherSid = `${sid.slice(0, -1)}${sid.endsWith('a') ? 'b' : 'a'}`;
  expect(await status(`${SESSION_COOKIE}=${encodeURIComponent(`s:${otherSid}${good.slice(2 + sid.length)}`)}`)).toBe(401);
  expect(await status(`${SESSION_COOKIE}=${encodeURIComponent(sid)}`)).toBe(401);
  expect(await status(`${SESSION_COOKIE}=${encodeURIComponent(`s:${sid}`)}`)).toBe(401);
});

test("the session's columns that PostgreSQL computes follow every write of it; a stored person id that is not a UUID names nobody", async () => {
  const user = await makeUser(t, 'vendor');
  const b = await signedIn(t, user);
  const cols = async (sid: string) => (await sql<{ person_id: string | null; names_person: boolean; max_age: number; xsrf: string | null; sess_xsrf: string | null }>(
    `select person_id, names_person, max_age, xsrf, sess ->> 'xsrf' as sess_xsrf from http_session where sid = ?`, [sid]))[0];
  const [{ sid }] = await sessionsOf(user.id);
  const signedInCols = await cols(sid);
  expect(signedInCols).toMatchObject({ person_id: user.id, names_person: true, max_age: expect.any(Number) });
  expect(signedInCols.xsrf).toBe(signedInCols.sess_xsrf);
  expect(signedInCols.xsrf).toMatch(/^[A-Za-z0-9_-]{32,64}$/);
  expect((await b.get('/api/tenders')).status).toBe(200);
  // Rewritten behind the API's back: the columns follow, and a malformed id names nobody (401, no error).
  await sql(`update http_session set sess = jsonb_set(sess::jsonb, '{passport,user}', '"not-a-uuid"')::json where sid = ?`, [sid]);
  expect(await cols(sid)).toMatchObject({ person_id: null, names_person: true });
  expect((await b.get('/api/tenders')).status).toBe(401);
  expect((await b.get('/api/session')).status).toBe(401);
});

test('the cache of checked session cookies answers as the signature check does, keeps only cookies that verified, and stays bounded', () => {
  const secret = 'a-secret-of-at-least-thirty-two-characters';
  const cookies = new VerifiedCookies(secret);
  const value = (sid: string, key = secret) => decodeURIComponent(signedCookie(sid, key).split('=').slice(1).join('='));
  const good = value('sid-one');
  expect(cookies.sid(good)).toBe('sid-one');
  expect(cookies.sid(good)).toBe(unsignSessionCookie(good, secret));
  // Forged after a good one was cached: refused every time, and never kept.
  const forged = value('sid-one', `${secret}x`);
  expect([cookies.sid(forged), cookies.sid(forged)]).toEqual([undefined, undefined]);
  expect(cookies.sid(`${good.slice(0, -1)}${good.endsWith('A') ? 'B' : 'A'}`)).toBeUndefined();
  expect(cookies.size).toBe(1);
  for (let k = 0; k < VerifiedCookies.LIMIT + 5; k++) expect(cookies.sid(value(`sid-${k}`))).toBe(`sid-${k}`);
  expect(cookies.size).toBeLessThanOrEqual(VerifiedCookies.LIMIT);
  expect(cookies.sid(good)).toBe('sid-one');
});

test('on the read path the session is read-only; sign-in and sign-out, also by a loosely matched path, still write it', async () => {
  const user = await makeUser(t, 'vendor');
  const b = await new Browser(t.app).init();
  // Express matches /api/Session/ to the sign-in route: it must go through express-session too.
  const signIn = await b.agent.post('/api/Session/').set('X-XSRF-TOKEN', b.token).send({ email: user.email, password: TEST_PASSWORD });
  expect(signIn.status).toBe(200);
  expect(await sessionsOf(user.id)).toHaveLength(1);
  expect((await b.get('/api/session')).body.user.id).toBe(user.id);
  // Sign-in answered with a fresh XSRF token, bound to the new session.
  const token = ([] as string[]).concat((signIn.headers['set-cookie'] as unknown as string[] | undefined) ?? []).find((c) => c.startsWith('XSRF-TOKEN='))!.split(';')[0].split('=')[1];
  expect((await b.agent.delete('/api/session/').set('X-XSRF-TOKEN', token)).status).toBe(204);
  expect(await sessionsOf(user.id)).toHaveLength(0);
  expect((await b.get('/api/session')).status).toBe(401);
});
