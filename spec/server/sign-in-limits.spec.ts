import request from 'supertest';
import { SESSION_COOKIE } from '../../server/context';
import { User } from '../../server/entities';
import { Browser, makeUser, signedIn, startTestApp, type TestApp } from '../support/app';
import { openTender } from '../support/tenders';

/** Issue 12, points 5 (sign-in) and 9 (no-store, XSRF rotation). */
jest.setTimeout(60_000);

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({ workers: false });
});
afterAll(() => t.close());

const cookieOf = (res: request.Response, name: string) =>
  ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((c) => c.startsWith(`${name}=`))?.split(';')[0]?.slice(name.length + 1);

describe('e-mails are normalised once (NFKC, lower case, trimmed)', () => {
  test('case and Unicode variants of one address sign in to the same account', async () => {
    const user = await makeUser(t, 'buyer', { email: 'anna.berg@council.test' });
    for (const variant of ['ANNA.BERG@COUNCIL.TEST', ' Anna.Berg@Council.test ', 'ａｎｎａ.ｂｅｒｇ@ｃｏｕｎｃｉｌ.ｔｅｓｔ']) {
      const res = await (await new Browser(t.app).init()).signIn(variant);
      expect({ variant, status: res.status, id: res.body.user?.id }).toEqual({ variant, status: 200, id: user.id });
    }
  });

  test('case and Unicode variants of one address share its sign-in limit', async () => {
    const user = await makeUser(t, 'buyer', { email: 'limit.me@council.test' });
    const variants = ['limit.me@council.test', 'LIMIT.ME@council.test', 'ｌｉｍｉｔ.ｍｅ@council.test', ' Limit.Me@Council.Test', 'limit.me@ＣＯＵＮＣＩＬ.test'];
    const b = await new Browser(t.app).init();
    for (let i = 0; i < 10; i++) expect((await b.signIn(variants[i % variants.length], 'wrong-password-x')).status).toBe(401);
    for (const v of variants) {
      const res = await b.signIn(v);
      expect({ v, status: res.status }).toEqual({ v, status: 429 });
    }
    expect(user.email).toBe('limit.me@council.test');
  });

  test('an invitation stores the normalised address and refuses a variant of a taken one', async () => {
    const admin = await signedIn(t, await makeUser(t, 'admin'));
    const res = await admin.post('/api/users', { name: 'Oz Kaya', email: ' OZ.Kaya@Ｃｏｕｎｃｉｌ.test', role: 'buyer' });
    expect(res.status).toBe(201);
    expect(res.body.email).toBe('oz.kaya@council.test');
    expect(await t.em().count(User, { email: 'oz.kaya@council.test' })).toBe(1);
    // Full-width letters are the same address once normalised.
    const dup = await admin.post('/api/users', { name: 'Other', email: 'ＯＺ.ＫＡＹＡ@council.test', role: 'buyer' });
    expect(dup.status).toBe(409);
    expect(dup.body.errors).toEqual([{ field: 'email', message: 'This e-mail already has an account.' }]);
  });
});

describe('password spraying', () => {
  let sprayed: TestApp;
  beforeAll(async () => {
    sprayed = await startTestApp({ workers: false, env: { SIGN_IN_IP_LIMIT: '6' } });
  });
  afterAll(() => sprayed.close());

  test('failed sign-ins from one IP address across many e-mails are limited, the right password included', async () => {
    const victim = await makeUser(sprayed, 'buyer');
    const b = await new Browser(sprayed.app).init();
    for (let i = 0; i < 6; i++) expect((await b.signIn(`person${i}@sprayed.test`, 'Summer2026!')).status).toBe(401);
    const res = await b.signIn(victim.email);
    expect(res.status).toBe(429);
    expect(res.body).toMatchObject({ title: 'Too many attempts' });
  });
});

describe('XSRF token rotation at sign-in', () => {
  test('the token after sign-in differs from the one before, and the one before is refused afterwards', async () => {
    const user = await makeUser(t, 'admin');
    const b = await new Browser(t.app).init();
    const before = b.token;
    const res = await b.signIn(user.email);
    expect(res.status).toBe(200);
    const after = cookieOf(res, 'XSRF-TOKEN');
    expect(after).toMatch(/^[A-Za-z0-9_-]{32,}$/);
    expect(after).not.toBe(before);
    const sid = cookieOf(res, SESSION_COOKIE)!;
    const body = { name: 'Via Old Token', email: 'old.token@council.test', role: 'buyer' };
    // The old token, even with a cookie planted to match it, is refused for this session.
    const old = await request(t.app).post('/api/users').set('Cookie', `${SESSION_COOKIE}=${sid}; XSRF-TOKEN=${before}`).set('X-XSRF-TOKEN', before).send(body);
    expect(old.status).toBe(403);
    expect(old.body.title).toBe('Missing XSRF token');
    const fresh = await request(t.app).post('/api/users').set('Cookie', `${SESSION_COOKIE}=${sid}; XSRF-TOKEN=${after}`).set('X-XSRF-TOKEN', after!).send(body);
    expect(fresh.status).toBe(201);
  });

  test('a signed-in page that lost its XSRF cookie gets the session\'s token back on its next GET', async () => {
    const user = await makeUser(t, 'buyer');
    const b = await new Browser(t.app).init();
    const signIn = await b.signIn(user.email);
    const sid = cookieOf(signIn, SESSION_COOKIE)!;
    const res = await request(t.app).get('/api/session').set('Cookie', `${SESSION_COOKIE}=${sid}`);
    expect(res.status).toBe(200);
    const cookies = ([] as string[]).concat(res.headers['set-cookie'] ?? []).filter((c) => c.startsWith('XSRF-TOKEN='));
    expect(cookies.at(-1)?.split(';')[0]).toBe(`XSRF-TOKEN=${b.token}`);
  });
});

describe('Cache-Control: no-store on API answers', () => {
  test('the session, people, outbox, bid and bid tabulation answers (and errors) are never stored by a cache', async () => {
    const admin = await signedIn(t, await makeUser(t, 'admin'));
    const buyer = await signedIn(t, await makeUser(t, 'buyer'));
    const vendorUser = await makeUser(t, 'vendor');
    const vendor = await signedIn(t, vendorUser);
    const tenderId = await openTender(buyer, [vendorUser.vendorOrganisation!.id]);
    const answers = {
      session: await admin.get('/api/session'),
      signedOut: await new Browser(t.app).agent.get('/api/session'),
      people: await admin.get('/api/users'),
      outbox: await admin.get('/api/outbox'),
      bid: await vendor.get(`/api/tenders/${tenderId}/bid`),
      tabulation: await buyer.get(`/api/tenders/${tenderId}/bids`),
      notFound: await admin.get('/api/no-such-route'),
    };
    const headers = Object.fromEntries(Object.entries(answers).map(([k, r]) => [k, r.headers['cache-control']]));
    expect(headers).toEqual(Object.fromEntries(Object.keys(answers).map((k) => [k, 'no-store'])));
    expect(answers.bid.status).toBeLessThan(500);
    expect(answers.tabulation.status).toBe(200);
  });
});
