import { spawn, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import net from 'node:net';
import path from 'node:path';
import { Bid } from '../../server/entities';
import { call, signIn, type Session } from '../../server/bench/support/http';
import { makeUser, startTestApp, TEST_PASSWORD, type TestApp } from '../support/app';
import { tenderBody } from '../support/tenders';
import { waitFor } from '../support/wait';

/**
 * The web server keeps no state of its own — sessions, failed sign-in counts, uploads, jobs and
 * locks are all in PostgreSQL — so several web processes can serve one database behind any load
 * balancer, without sticky sessions. Two built servers (`node dist/server/main.js`, as in
 * production) on one test database: a person signed in on one is signed in on the other, and each
 * sees at once what was changed through the other.
 */
jest.setTimeout(120_000);

const root = path.join(__dirname, '..', '..');
let t: TestApp;
const servers: ChildProcess[] = [];
let a: string;
let b: string;

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const { port } = s.address() as net.AddressInfo;
      s.close(() => resolve(port));
    });
  });
}

async function startWebProcess(secret: string): Promise<string> {
  const port = await freePort();
  const env: NodeJS.ProcessEnv = {
    ...process.env, NODE_ENV: 'production', HOST: '127.0.0.1', PORT: String(port), DATABASE_URL: t.config.databaseUrl,
    SESSION_SECRET: secret, SMTP_URL: t.config.smtpUrl, RUN_WORKERS: '0', LOG_LEVEL: 'warn',
  };
  // The test's own catcher takes the mail; neither web process runs one.
  delete env['MAIL_CATCHER_PORT'];
  const child = spawn(process.execPath, [path.join(root, 'dist/server/main.js')], {
    env,
    stdio: ['ignore', 'ignore', 'inherit'],
  });
  servers.push(child);
  const url = `http://127.0.0.1:${port}`;
  // Ready when it answers; a process that exits fails the test at once.
  return waitFor(`the web process on port ${port} to answer`, async () => {
    if (child.exitCode !== null) throw new Error(`the web process on port ${port} exited with ${child.exitCode}`);
    const status = await fetch(`${url}/api/session`).then((r) => r.status, () => 0);
    return status === 401 && url;
  });
}

beforeAll(async () => {
  // The in-process app gives the database and the workers (mail); the two web processes serve.
  t = await startTestApp({ solver: false });
  const secret = randomBytes(32).toString('hex');
  [a, b] = await Promise.all([startWebProcess(secret), startWebProcess(secret)]);
});
afterAll(async () => {
  await Promise.all(servers.map((s) => (s.exitCode === null ? new Promise((r) => { s.once('exit', r); s.kill('SIGTERM'); }) : Promise.resolve())));
  await t.close();
});

test('signed in on one web process, a vendor saves a bid on the other; each process sees the other\'s changes; sign-out on one ends the session on both', async () => {
  const buyerUser = await makeUser(t, 'buyer');
  const vendorUser = await makeUser(t, 'vendor');
  const org = vendorUser.vendorOrganisation!.id;

  // The buyer signs in on A and opens a tender there; the vendor signs in on B.
  const buyer: Session = await signIn(a, buyerUser.email, TEST_PASSWORD);
  const body = tenderBody(4, 60);
  const created = await call<{ id: string }>(a, buyer, 'POST', '/api/tenders', body);
  expect(created.status).toBe(201);
  const id = created.body.id;
  expect((await call(a, buyer, 'POST', `/api/tenders/${id}/invitations`, { vendorOrganisationIds: [org] })).status).toBe(200);
  expect((await call(a, buyer, 'POST', `/api/tenders/${id}/publish`)).status).toBe(200);
  const vendor: Session = await signIn(b, vendorUser.email, TEST_PASSWORD);

  // Each session is good on the other process too.
  expect((await call<{ user: { id: string } }>(b, buyer, 'GET', '/api/session')).body.user.id).toBe(buyerUser.id);
  expect((await call<{ user: { id: string } }>(a, vendor, 'GET', '/api/session')).body.user.id).toBe(vendorUser.id);

  // The tender published on A is in the vendor's list on B; the bid submitted on B is read on A.
  const list = await call<{ items: { id: string; status: string }[] }>(b, vendor, 'GET', '/api/tenders');
  expect(list.body.items.find((x) => x.id === id)?.status).toBe('open');
  const prices = { R01: 51.5, R02: 52, R03: 53.25, R04: 54 };
  const saved = await call<{ version: number; digest: string }>(b, vendor, 'PUT', `/api/tenders/${id}/bid`, { fixedFee: 12_000, capacity: null, prices, submit: true, version: null });
  expect(saved.status).toBe(200);
  const own = await call<{ bid: { version: number; digest: string; prices: Record<string, number> } }>(a, vendor, 'GET', `/api/tenders/${id}/bid`);
  expect(own.body.bid).toMatchObject({ version: saved.body.version, digest: saved.body.digest, prices });
  expect((await call<{ submitted: number }>(a, buyer, 'GET', `/api/tenders/${id}/bids`)).body.submitted).toBe(1);
  expect(await t.em().count(Bid, { tender: id, vendorOrganisation: org, status: 'submitted' })).toBe(1);

  // A revision on A over the version saved on B; a stale save on B (the version before it) is refused.
  const revised = await call<{ version: number }>(a, vendor, 'PUT', `/api/tenders/${id}/bid`, { fixedFee: 11_500, capacity: null, prices, submit: true, version: saved.body.version });
  expect(revised.status).toBe(200);
  expect((await call(b, vendor, 'PUT', `/api/tenders/${id}/bid`, { fixedFee: 11_000, capacity: null, prices, submit: true, version: saved.body.version })).status).toBe(409);

  // Sign-out on A ends the session on B at its very next request.
  expect((await call(a, vendor, 'DELETE', '/api/session')).status).toBe(204);
  expect((await call(b, vendor, 'GET', '/api/session')).status).toBe(401);
});

test('failed sign-ins are counted across web processes: the limit is the same with two as with one', async () => {
  const user = await makeUser(t, 'buyer');
  const attempt = async (url: string) => {
    const first = await fetch(`${url}/api/session`);
    const xsrf = first.headers.getSetCookie().find((c) => c.startsWith('XSRF-TOKEN='))!.split(';')[0].split('=')[1];
    const res = await fetch(`${url}/api/session`, {
      method: 'POST', headers: { 'content-type': 'application/json', 'x-xsrf-token': xsrf, cookie: `XSRF-TOKEN=${xsrf}` },
      body: JSON.stringify({ email: user.email, password: 'not-the-password' }),
    });
    return res.status;
  };
  // Ten failures, alternating between the two processes, then the eleventh is refused on either.
  for (let k = 0; k < 10; k++) expect(await attempt(k % 2 ? a : b)).toBe(401);
  expect(await attempt(a)).toBe(429);
  expect(await attempt(b)).toBe(429);
});
